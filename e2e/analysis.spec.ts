import { expect, request as playwrightRequest, test, type APIRequestContext } from '@playwright/test'
import { DEMO_PASSWORD, demo, screen, signIn } from './fixtures'

const BASE = process.env.E2E_BASE_URL ?? 'http://127.0.0.1:3000'

async function apiAs(key: string): Promise<APIRequestContext> {
  const api = await playwrightRequest.newContext({ baseURL: BASE, extraHTTPHeaders: { Origin: BASE } })
  const res = await api.post('/api/auth/login', { data: { email: demo(key).email, password: DEMO_PASSWORD } })
  expect(res.ok()).toBeTruthy()
  return api
}
async function post<T>(api: APIRequestContext, path: string, data: unknown, status = 201): Promise<T> {
  const res = await api.post(path, { data })
  expect(res.status(), `${path}: ${await res.text()}`).toBe(status)
  return (await res.json()) as T
}

/**
 * A -6m2 monolayer-like crystal on a (001) wafer with the flat along [010], a chip turned 5°, one array; a signed-off
 * setup; a session.
 */
async function makeSession(stamp: string) {
  const fab = await apiAs('fab')
  const material = await post<{ id: number }>(fab, '/api/materials', {
    name: `E2E TMD ${stamp}`,
    formula: 'MoS2',
    pointGroup: '-6m2',
  })
  const wafer = await post<{ id: number }>(fab, '/api/wafers', {
    materialId: material.id,
    cutNormal: [0, 0, 1],
    flatDirection: [0, 1, 0],
    diameterMm: 50.8,
    thicknessUm: 350,
    lot: `E2E-${stamp}`,
  })
  const { chips } = await post<{ chips: { id: number; code: string }[] }>(fab, `/api/wafers/${wafer.id}/dice`, {
    count: 1,
    widthMm: 5,
    heightMm: 5,
  })
  const array = await post<{ id: number; code: string }>(fab, `/api/chips/${chips[0].id}/arrays`, {
    position: 'B1',
    shape: 'disk',
    dimensionsNm: { diameterNm: 450 },
    lattice: 'square',
    periodXNm: 900,
    periodYNm: 900,
    count: 400,
  })
  // Described and submitted by the optics person, signed off by the safety officer (the describer never approves).
  const optics = await apiAs('optics')
  const setup = await post<{ id: number }>(optics, '/api/laser-setups', {
    name: `E2E OPO ${stamp}`,
    room: 'B2.14',
    sourceType: 'mode_locked',
    wavelengthsNm: [1550, 800],
    pulseDurationFs: 150,
    repRateHz: 80e6,
    maxAvgPowerMw: 500,
    beamDiameterMm: 2,
    eyewear: [{ description: 'E2E goggle', bandsNm: '750–1600', od: 6 }],
    interlocks: 'Door interlock',
  })
  await post(optics, `/api/laser-setups/${setup.id}/submit`, {}, 200)
  const safety = await apiAs('safety')
  const expiresOn = new Date(Date.now() + 90 * 86400_000).toISOString().slice(0, 10)
  await post(safety, `/api/laser-setups/${setup.id}/approve`, { expiresOn, note: 'E2E sign-off' }, 200)
  const session = await post<{ id: number; code: string }>(optics, '/api/sessions', {
    laserSetupId: setup.id,
    performedAt: new Date(Date.now() - 3600_000).toISOString(),
    wavelengthNm: 1550,
    pulseDurationFs: 150,
    repRateHz: 80e6,
    avgPowerMw: 10,
    spotDiameterUm: 2.5,
    objectiveNa: 0.7,
    pump: { type: 'linear', angle: 0 },
    harmonicOrder: 2,
    geometry: 'reflection',
    collection: 'normal',
    detector: 'E2E PMT',
    results: [{ arrayId: array.id, observedNormal: 'present' }],
    safetyNotesRead: true,
  })
  // A sweep with the six-fold law of a D3h crystal whose flat direction sits 17.3° from the chip edge.
  const rad = (d: number) => (d * Math.PI) / 180
  const lines = ['angle_deg,I_par,I_perp']
  for (let a = 0; a < 360; a += 3)
    lines.push(
      `${a},${(900 * Math.cos(3 * rad(a - 17.3)) ** 2 + 50 + 20 * Math.sin(a * 7.1)).toFixed(2)},${(900 * Math.sin(3 * rad(a - 17.3)) ** 2 + 50 + 20 * Math.cos(a * 5.3)).toFixed(2)}`,
    )
  const up = await optics.post('/api/files', {
    multipart: {
      entity: 'session',
      entityId: String(session.id),
      kind: 'sweep',
      file: { name: `sweep-${stamp}.csv`, mimeType: 'text/csv', buffer: Buffer.from(lines.join('\n')) },
    },
  })
  expect(up.status(), await up.text()).toBe(201)
  for (const api of [fab, safety, optics]) await api.dispose()
  return { array, session, chip: chips[0] }
}

test('optics staff fit a polarisation sweep and print a sample sheet', async ({ page }) => {
  test.setTimeout(150_000)
  const { array, session } = await makeSession(`${Date.now()}`)
  await signIn(page, demo('optics').email)
  for (const [w, h, tag] of [
    [1440, 900, 'desk'],
    [800, 1280, 'tablet'],
  ] as const) {
    await page.setViewportSize({ width: w, height: h })
    await page.goto(`/sessions/${session.id}`)
    await page.getByTestId('analyse-data').click()
    await expect(page.getByRole('heading', { name: /Analyse session/ })).toBeVisible()
    await page.getByTestId('run-fit').click()
    await expect(page.getByTestId('fit-azimuth')).toContainText('17.3')
    await expect(page.getByTestId('fit-sentence')).toContainText("counter-clockwise from the chip's reference edge")
    await expect(page.getByTestId('symmetry-badge')).toContainText('matches')
    await expect(page.getByTestId('fit-result').locator('svg').first()).toBeVisible()
    await screen(page, `analysis-fit-${tag}`)
  }
  await page.getByTestId('save-fit').click()
  await expect(page.getByText(/Polar fit #\d+/)).toBeVisible()

  await page.goto(`/arrays/${array.id}/patterns`)
  await expect(page.getByTestId('pattern-assumptions')).toContainText('normal incidence')
  await screen(page, 'analysis-patterns-tablet')

  await page.setViewportSize({ width: 1440, height: 900 })
  await page.goto(`/arrays/${array.id}/sheet`)
  await expect(page.getByTestId('sheet-code')).toHaveText(array.code)
  await expect(page.getByText(session.code)).toBeVisible()
  await page.emulateMedia({ media: 'print' })
  await expect(page.getByTestId('print-sheet')).toBeHidden()
  await screen(page, 'analysis-sheet-print')
})
