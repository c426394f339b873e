import { expect, request as playwrightRequest, test, type APIRequestContext, type Page } from '@playwright/test'
import { DEMO_PASSWORD, demo, screen, signIn } from './fixtures'

/**
 * Careless input is never stored silently and typed work is never lost: "Record as harmonic signal"
 * asks before replacing a recorded power, picking a laser setup fills its pulse duration and
 * repetition rate, and long forms ask before a link or the browser's Back throws typed input away.
 * At a laptop (1366×768) and a tablet held upright (820×1180).
 */
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
 * A chip with one disk array, a signed-off setup (150 fs, 80 MHz), and a session on the array with 2 nW recorded and a
 * spectrum attached.
 */
async function makeSession(stamp: string) {
  const fab = await apiAs('fab')
  const material = await post<{ id: number }>(fab, '/api/materials', {
    name: `E2E careless ${stamp}`,
    formula: 'GaAs',
    pointGroup: '-43m',
  })
  const wafer = await post<{ id: number }>(fab, '/api/wafers', {
    materialId: material.id,
    cutNormal: [0, 0, 1],
    flatDirection: [1, 1, 0],
    diameterMm: 50.8,
    thicknessUm: 350,
    lot: `E2E-C-${stamp}`,
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
  await fab.dispose()
  const optics = await apiAs('optics')
  const setup = await post<{ id: number; code: string; name: string }>(optics, '/api/laser-setups', {
    name: `E2E careless OPO ${stamp}`,
    room: 'B2.14',
    sourceType: 'mode_locked',
    wavelengthsNm: [1550],
    pulseDurationFs: 150,
    repRateHz: 80e6,
    maxAvgPowerMw: 500,
    beamDiameterMm: 2,
    eyewear: [{ description: 'E2E goggle', bandsNm: '750–1600', od: 6 }],
    interlocks: 'Door interlock',
  })
  await post(optics, `/api/laser-setups/${setup.id}/submit`, {}, 200)
  const safety = await apiAs('safety')
  await post(
    safety,
    `/api/laser-setups/${setup.id}/approve`,
    { expiresOn: new Date(Date.now() + 90 * 86400_000).toISOString().slice(0, 10), note: 'E2E sign-off' },
    200,
  )
  await safety.dispose()
  const session = await post<{ id: number; code: string }>(optics, '/api/sessions', {
    laserSetupId: setup.id,
    performedAt: new Date(Date.now() - 3600_000).toISOString(),
    wavelengthNm: 1550,
    pulseDurationFs: 150,
    repRateHz: 80e6,
    avgPowerMw: 10,
    pump: { type: 'circular', m: 1 },
    harmonicOrder: 2,
    geometry: 'reflection',
    collection: 'normal',
    results: [{ arrayId: array.id, harmonicPowerW: 2e-9, observedNormal: 'none' }],
    safetyNotesRead: true,
  })
  const lines = ['wavelength_nm,counts']
  for (let nm = 700; nm <= 850; nm += 1)
    lines.push(`${nm},${Math.round(50 + 4000 * Math.exp(-(((nm - 775) / 6) ** 2)))}`)
  const up = await optics.post('/api/files', {
    multipart: {
      entity: 'session',
      entityId: String(session.id),
      kind: 'spectrum',
      file: { name: `careless-${stamp}.csv`, mimeType: 'text/csv', buffer: Buffer.from(lines.join('\n')) },
    },
  })
  expect(up.status(), await up.text()).toBe(201)
  return { optics, array, setup, session, chip: chips[0], waferId: wafer.id }
}

/** The in-app question before leaving a form with typed input. */
const leaveQuestion = (page: Page) => page.getByRole('dialog').filter({ hasText: 'Leave without saving?' })

for (const [label, viewport] of [
  ['laptop', { width: 1366, height: 768 }],
  ['tablet', { width: 820, height: 1180 }],
] as const) {
  test(`careless input (${label}): a recorded power is replaced only on a yes, a setup fills its beam, typed input is kept`, async ({
    page,
  }) => {
    test.setTimeout(150_000)
    await page.setViewportSize(viewport)
    const stamp = `${Date.now()}`
    const { optics, array, setup, session, chip, waferId } = await makeSession(stamp)
    const recorded = async () =>
      ((await (await optics.get(`/api/sessions/${session.id}`)).json()) as { results: { harmonicPowerW: number }[] })
        .results[0].harmonicPowerW

    await signIn(page, demo('optics').email)

    // 1. "Record as harmonic signal" over a recorded 2 nW: asked, kept on "Keep", replaced on "Replace it".
    await page.goto(`/sessions/${session.id}/analysis`)
    await expect(page.getByRole('heading', { name: /Analyse session/ })).toBeVisible()
    await page.getByLabel('Calibration', { exact: true }).fill('1e-12')
    await page.getByRole('button', { name: 'Find harmonic peak' }).click()
    await expect(page.getByTestId('recorded-power')).toContainText('Recorded now: 2 nW')
    await page.getByRole('button', { name: 'Record as harmonic signal' }).click()
    const replace = page.getByRole('dialog').filter({ hasText: 'Replace the recorded harmonic power?' })
    await expect(replace).toContainText(`${array.code} already has a harmonic power of 2 nW recorded`)
    await screen(page, `careless-replace-power-${label}`)
    await replace.getByRole('button', { name: 'Keep the recorded value' }).click()
    await expect(replace).toBeHidden()
    expect(await recorded()).toBe(2e-9)
    await page.getByRole('button', { name: 'Record as harmonic signal' }).click()
    await replace.getByRole('button', { name: 'Replace it' }).click()
    await expect(page.getByText(/Harmonic signal .* W recorded for/)).toBeVisible()
    expect(await recorded()).toBeGreaterThan(1e-8)

    // 2. Log a session: the setup fills 150 fs and 80 MHz (editable).
    // (reached inside the app, so the browser's Back below stays in it)
    await page.goto('/measurements')
    await page.getByRole('link', { name: 'Log a session' }).click()
    await expect(page.getByRole('heading', { name: 'Log a session' })).toBeVisible()
    await page.getByLabel('Laser setup').click()
    await page.getByLabel('Laser setup').pressSequentially(setup.name.slice(-8))
    await page.getByRole('option', { name: new RegExp(setup.name) }).click()
    await expect(page.getByLabel('Pulse duration')).toHaveValue('150')
    await expect(page.getByLabel('Repetition rate')).toHaveValue('80')
    await expect(page.getByTestId('filled-from-setup')).toContainText(`Registered for ${setup.code}: 150 fs, 80 MHz`)
    await page.getByLabel('Pulse duration').fill('180')
    await page.getByLabel('Average power').fill('12')
    await screen(page, `careless-setup-fills-beam-${label}`)

    // 3. Typed input is not lost: the back arrow and the browser's Back ask; "Stay" keeps it; a tab close is held.
    await page.getByRole('link', { name: 'Back to the sessions' }).click()
    await expect(leaveQuestion(page)).toBeVisible()
    await screen(page, `careless-leave-asks-${label}`)
    await leaveQuestion(page).getByRole('button', { name: 'Stay' }).click()
    await expect(leaveQuestion(page)).toBeHidden()
    await expect(page.getByLabel('Pulse duration')).toHaveValue('180')
    await page.goBack()
    await expect(leaveQuestion(page)).toBeVisible()
    await leaveQuestion(page).getByRole('button', { name: 'Stay' }).click()
    await expect(leaveQuestion(page)).toBeHidden()
    await expect(page).toHaveURL(/\/measurements\/new$/)
    await expect(page.getByLabel('Average power')).toHaveValue('12')
    expect(
      await page.evaluate(() => {
        const e = new Event('beforeunload', { cancelable: true })
        window.dispatchEvent(e)
        return e.defaultPrevented
      }),
    ).toBe(true)
    await page.getByRole('link', { name: 'Back to the sessions' }).click()
    await leaveQuestion(page).getByRole('button', { name: 'Leave' }).click()
    await expect(page.getByRole('heading', { name: 'Optical measurements' })).toBeVisible()

    // 4. The laser setup form: Cancel with typed input asks before throwing it away.
    await page.goto('/laser-setups')
    await page.getByRole('button', { name: 'New setup' }).click()
    const setupDialog = page.getByRole('dialog').filter({ hasText: 'New laser setup' })
    await setupDialog.getByLabel('Name').fill('Half-described OPO')
    await setupDialog.getByRole('button', { name: 'Cancel' }).click()
    const discard = page.getByRole('dialog').filter({ hasText: 'Discard what you typed?' })
    await expect(discard).toBeVisible()
    await discard.getByRole('button', { name: 'Keep editing' }).click()
    await expect(discard).toBeHidden()
    await expect(setupDialog.getByLabel('Name')).toHaveValue('Half-described OPO')
    await setupDialog.getByRole('button', { name: 'Cancel' }).click()
    await discard.getByRole('button', { name: 'Discard' }).click()
    await expect(setupDialog).toBeHidden()
    await optics.dispose()

    // 5. The array form (fab technician): Esc does not close it with typed input, the browser's Back asks.
    await page.context().clearCookies()
    await signIn(page, demo('fab').email)
    // (the chip page reached from its wafer's, so the browser's Back stays in the app)
    await page.goto(`/wafers/${waferId}`)
    await page.getByRole('cell', { name: chip.code, exact: true }).click()
    await page.getByRole('button', { name: 'Add array' }).click()
    const arrayDialog = page.getByRole('dialog').filter({ hasText: `Add an array to ${chip.code}` })
    await arrayDialog.getByLabel('Position on the chip').fill('C3')
    await page.keyboard.press('Escape')
    await expect(arrayDialog).toBeVisible()
    await page.goBack()
    await expect(leaveQuestion(page)).toBeVisible()
    await leaveQuestion(page).getByRole('button', { name: 'Stay' }).click()
    await expect(leaveQuestion(page)).toBeHidden()
    await expect(arrayDialog.getByLabel('Position on the chip')).toHaveValue('C3')
    await screen(page, `careless-array-form-kept-${label}`)
    await arrayDialog.getByRole('button', { name: 'Cancel' }).click()
    await page
      .getByRole('dialog')
      .filter({ hasText: 'Discard what you typed?' })
      .getByRole('button', { name: 'Discard' })
      .click()
    await expect(arrayDialog).toBeHidden()

    // 6. A fab step: each parameter with its unit; a bake at 1800 °C is refused on its field, a value typed under
    // another kind is named.
    await page.getByRole('button', { name: 'Add fab step' }).click()
    const stepDialog = page.getByRole('dialog').filter({ hasText: `Fabrication step on ${chip.code}` })
    await stepDialog.getByLabel('Spin speed').fill('4000')
    await stepDialog.getByLabel('Bake temperature').fill('1800')
    await stepDialog.getByRole('button', { name: 'Record step' }).click()
    await expect(stepDialog.getByText('At most 400 °C')).toBeVisible()
    await screen(page, `careless-fab-step-range-${label}`)
    await stepDialog.getByLabel('Bake temperature').fill('180')
    await stepDialog.getByRole('button', { name: 'Etch', exact: true }).click()
    await stepDialog.getByLabel('Gas').fill('Cl2/Ar')
    await stepDialog.getByRole('button', { name: 'Record step' }).click()
    await expect(stepDialog.getByRole('alert').filter({ hasText: 'Typed for another kind of step' })).toContainText(
      'Spin speed (resist), Bake temperature (resist)',
    )
    await stepDialog.getByRole('button', { name: /^Clear / }).click()
    await stepDialog.getByRole('button', { name: 'Record step' }).click()
    await expect(stepDialog).toBeHidden()
    await expect(page.getByText('Gas: Cl2/Ar')).toBeVisible()
  })
}
