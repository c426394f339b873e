import { expect, request as playwrightRequest, test } from '@playwright/test'
import { DEMO_PASSWORD, demo, screen, signIn } from './fixtures'

const BASE = process.env.E2E_BASE_URL ?? 'http://127.0.0.1:3000'

/** The figures of a setup at a chosen evaluation time, at desktop and tablet widths, and in the live preview. */
test('the setup page says which evaluation time is used, refuses 0.25 s for invisible lines, and shows EN 208 and recognised harmonics', async ({
  page,
}) => {
  test.setTimeout(120_000)
  const api = await playwrightRequest.newContext({ baseURL: BASE, extraHTTPHeaders: { Origin: BASE } })
  expect(
    (await api.post('/api/auth/login', { data: { email: demo('optics').email, password: DEMO_PASSWORD } })).ok(),
  ).toBeTruthy()
  const res = await api.post('/api/laser-setups', {
    data: {
      name: `E2E OPO with harmonics and a long descriptive name ${Date.now()}`,
      room: 'C1.05',
      sourceType: 'mode_locked',
      wavelengthsNm: [1550, 775, 517],
      harmonicOrders: [2, 3],
      pulseDurationFs: 200,
      repRateHz: 80e6,
      maxAvgPowerMw: 500,
      beamDiameterMm: 2,
      divergenceMrad: 1,
      laserClass: '4',
      eyewear: [{ description: 'IR goggle', bandsNm: '1400–1700', od: 4, en207: null }],
    },
  })
  expect(res.status(), await res.text()).toBe(201)
  const setup = (await res.json()) as { id: number }
  await api.dispose()

  await page.setViewportSize({ width: 1366, height: 900 })
  await signIn(page, demo('optics').email)
  await page.goto(`/laser-setups/${setup.id}`)
  const figures = page.getByTestId('setup-figures')
  await expect(figures.getByTestId('exposure-used')).toContainText('T = 10 s')
  await expect(figures.getByTestId('line-figures')).toHaveCount(3)
  await expect(figures.getByText(/listed, recognised as harmonic 2 of 1550 nm/)).toBeVisible()
  await expect(figures.getByText(/258|172(\.\d)? nm/)).toHaveCount(0)
  await page
    .getByTestId('exposure-choice')
    .getByRole('button', { name: /0\.25 s/ })
    .click()
  await expect(figures.getByTestId('exposure-used')).toContainText('T = 0.25 s')
  await expect(figures.getByTestId('exposure-note').first()).toContainText('1550 nm is not visible')
  await expect(page.getByTestId('laser-caution').first()).toBeVisible()
  await screen(page, 'laser-figures-1366')
  await page.setViewportSize({ width: 820, height: 1180 })
  await screen(page, 'laser-figures-820')
  await page.getByRole('button', { name: 'Edit' }).click()
  const dialog = page.getByRole('dialog')
  await expect(dialog.getByTestId('setup-figures')).toBeVisible()
  await expect(dialog.getByTestId('laser-caution')).toBeVisible()
  await screen(page, 'laser-figures-preview-820')
  await page.setViewportSize({ width: 1366, height: 900 })
  await screen(page, 'laser-figures-preview-1366')
})
