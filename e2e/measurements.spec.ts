import { expect, request as playwrightRequest, test, type APIRequestContext } from '@playwright/test'
import { DEMO_PASSWORD, demo, screen, signIn } from './fixtures'

const BASE = process.env.E2E_BASE_URL ?? 'http://127.0.0.1:3000'

/** An API client signed in as a demo person (the Origin header satisfies the server's same-origin check). */
async function apiAs(key: string): Promise<APIRequestContext> {
  const api = await playwrightRequest.newContext({ baseURL: BASE, extraHTTPHeaders: { Origin: BASE } })
  const res = await api.post('/api/auth/login', { data: { email: demo(key).email, password: DEMO_PASSWORD } })
  expect(res.ok()).toBeTruthy()
  return api
}

async function post<T>(api: APIRequestContext, path: string, data: unknown): Promise<T> {
  const res = await api.post(path, { data })
  expect(res.status(), `${path}: ${await res.text()}`).toBe(201)
  return (await res.json()) as T
}

/** A (001) GaAs wafer → one chip → a disk array (fab technician), and a laser setup (safety officer). */
async function makeSample(stamp: string) {
  const fab = await apiAs('fab')
  const material = await post<{ id: number }>(fab, '/api/materials', {
    name: `E2E GaAs ${stamp}`,
    formula: 'GaAs',
    pointGroup: '-43m',
  })
  const wafer = await post<{ id: number }>(fab, '/api/wafers', {
    materialId: material.id,
    cutNormal: [0, 0, 1],
    flatDirection: [1, 1, 0],
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
    lattice: 'single',
    count: 400,
  })
  // Described and submitted by the optics person, signed off by the safety officer (sessions need a signed-off setup;
  // describer ≠ checker).
  const describer = await apiAs('optics')
  const setup = await post<{ id: number; code: string; name: string }>(describer, '/api/laser-setups', {
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
  expect((await describer.post(`/api/laser-setups/${setup.id}/submit`, { data: {} })).status()).toBe(200)
  await describer.dispose()
  const safety = await apiAs('safety')
  const expiresOn = new Date(Date.now() + 90 * 86400_000).toISOString().slice(0, 10)
  const approved = await safety.post(`/api/laser-setups/${setup.id}/approve`, {
    data: { expiresOn, note: 'E2E sign-off' },
  })
  expect(approved.status(), await approved.text()).toBe(200)
  await fab.dispose()
  await safety.dispose()
  return { array, setup, chipCode: chips[0].code }
}

/** A PNG of 2×2 pixels. */
const PNG = Buffer.from(
  'iVBORw0KGgoAAAANSUhEUgAAAAIAAAACCAIAAAD91JpzAAAAFklEQVR4nGP8z8DAwMDAxMDAwMDAAAANHQEDasKb6QAAAABJRU5ErkJggg==',
  'base64',
)

function spectrumCsv(): string {
  const lines = ['wavelength_nm,counts']
  for (let nm = 500; nm <= 900; nm += 2)
    lines.push(`${nm},${Math.round(50 + 4000 * Math.exp(-(((nm - 775) / 6) ** 2)))}`)
  return lines.join('\n')
}

test('optics staff log a session, see the contradiction flag, and attach a spectrum and an image', async ({ page }) => {
  test.setTimeout(150_000)
  const stamp = `${Date.now()}`
  const { array, setup } = await makeSample(stamp)

  await signIn(page, demo('optics').email)
  await page.goto('/measurements')
  await expect(page.getByRole('heading', { name: 'Optical measurements' })).toBeVisible()
  await screen(page, 'measurements-list')
  await page.getByRole('link', { name: 'Log a session' }).click()
  await expect(page.getByRole('heading', { name: 'Log a session' })).toBeVisible()

  // Pick the array by typing its code.
  await page.getByLabel(/Add an array/).fill(array.code)
  await page.getByRole('option', { name: new RegExp(array.code) }).click()
  const result = page.getByTestId(`result-${array.code}`)
  await expect(result).toBeVisible()

  // Laser setup, with the caution under the picker.
  await page.getByLabel('Laser setup').click()
  await page.getByLabel('Laser setup').pressSequentially(setup.name.slice(-8))
  await page.getByRole('option', { name: new RegExp(setup.name) }).click()
  await expect(page.getByTestId('laser-caution')).toContainText('laser safety officer')
  await page.getByRole('checkbox', { name: /I have read this setup's safety notes/ }).click()
  await page.getByLabel('Pulse duration').fill('150')
  await page.getByLabel('Repetition rate').fill('80')
  await page.getByLabel('Average power').fill('10')

  // Circular pump m = +1 (the default) with both handedness conventions spelled out.
  await expect(page.getByText('m = +1: counter-clockwise seen from +z')).toBeVisible()

  // Observed: co-rotating emission along the normal, 2.5 nW.
  await result.getByLabel('Harmonic power').fill('2.5')
  await result.getByLabel('Seen along the normal').click()
  await page.getByRole('option', { name: 'Co-rotating circular' }).click()

  // Live prediction: m ∈ {0, +4}, normal emission forbidden → red flag.
  const prediction = page.getByTestId(`prediction-${array.code}`)
  await expect(prediction).toContainText('forbidden')
  await expect(prediction.getByRole('alert')).toContainText('check tilt, substrate or surface contributions')
  await expect(page.getByTestId('derived-figures')).toContainText('125 pJ')
  await screen(page, 'session-form-preview')
  await page.setViewportSize({ width: 800, height: 1280 })
  await screen(page, 'session-form-preview-tablet')
  await page.setViewportSize({ width: 1440, height: 900 })

  await page.getByRole('button', { name: 'Save session' }).click()
  await expect(page.getByRole('heading', { level: 1 })).toContainText(/Session\s*S-/)
  const saved = page.getByTestId(`result-${array.code}`)
  await expect(saved.getByRole('alert')).toContainText('Emission along the normal observed where the engine forbids it')
  await expect(page.getByText(/1 flag/)).toBeVisible()
  await screen(page, 'session-detail')

  // Upload a CSV spectrum → plot with the λ/2 marker.
  await page.getByLabel('Kind of file').click()
  await page.getByRole('option', { name: 'Spectrum CSV' }).click()
  await page
    .locator('input[type=file]')
    .setInputFiles({ name: `shg-${stamp}.csv`, mimeType: 'text/csv', buffer: Buffer.from(spectrumCsv()) })
  await page.getByRole('button', { name: 'Upload' }).click()
  const plotted = page.getByTestId(`file-shg-${stamp}.csv`)
  await expect(plotted.getByTestId('spectrum-plot')).toBeVisible()
  await expect(plotted).toContainText('λ/2 and λ/3')
  await expect(plotted.getByTestId('spectrum-plot').locator('svg')).toBeVisible()
  await screen(page, 'session-spectrum-plot')

  // Upload a PNG as a camera image → thumbnail, then enlarge it.
  await page.getByLabel('Kind of file').click()
  await page.getByRole('option', { name: 'Camera image' }).click()
  await page
    .locator('input[type=file]')
    .setInputFiles({ name: `spot-${stamp}.png`, mimeType: 'image/png', buffer: PNG })
  await page.getByRole('button', { name: 'Upload' }).click()
  const thumb = page.getByRole('button', { name: `Enlarge spot-${stamp}.png` })
  await expect(thumb.locator('img')).toBeVisible()
  await expect.poll(() => thumb.locator('img').evaluate((img: HTMLImageElement) => img.naturalWidth)).toBeGreaterThan(0)
  // The uploader may retire their own file (so may group leads and administrators; others do not see it).
  await expect(page.getByRole('button', { name: `Retire spot-${stamp}.png` })).toBeVisible()
  await thumb.click()
  await expect(page.getByRole('dialog').getByRole('img', { name: `Preview of spot-${stamp}.png` })).toBeVisible()
  await screen(page, 'session-image-enlarged')
  await page.keyboard.press('Escape')

  // PNG bytes named .csv as a spectrum: the server checks the content and answers with a red hint.
  await page.getByLabel('Kind of file').click()
  await page.getByRole('option', { name: 'Spectrum CSV' }).click()
  await page.locator('input[type=file]').setInputFiles({ name: `fake-${stamp}.csv`, mimeType: 'text/csv', buffer: PNG })
  await page.getByRole('button', { name: 'Upload' }).click()
  await expect(page.locator('.q-field--error').first()).toBeVisible()
  await screen(page, 'session-wrong-file')
  await page.setViewportSize({ width: 800, height: 1280 })
  await screen(page, 'session-detail-tablet')

  // Back on the list, the new session is there.
  await page.goto('/measurements')
  await page.getByLabel('Array code').fill(array.code)
  await expect(page.getByRole('row', { name: new RegExp(array.code) })).toBeVisible()
  await screen(page, 'measurements-list-filtered-tablet')
})
