import { expect, request as playwrightRequest, test, type APIRequestContext } from '@playwright/test'
import { DEMO_PASSWORD, demo, screen, signIn, signOut } from './fixtures'

const BASE = process.env.E2E_BASE_URL ?? 'http://127.0.0.1:3000'

async function apiAs(key: string): Promise<APIRequestContext> {
  const api = await playwrightRequest.newContext({ baseURL: BASE, extraHTTPHeaders: { Origin: BASE } })
  const res = await api.post('/api/auth/login', { data: { email: demo(key).email, password: DEMO_PASSWORD } })
  expect(res.ok()).toBeTruthy()
  return api
}

/**
 * A Ti:sapphire setup (800 nm, 100 fs, 80 MHz, 1 W, with SH) described and submitted by the optics person: it waits for
 * sign-off.
 */
async function makeWaitingSetup(stamp: string) {
  const optics = await apiAs('optics')
  const res = await optics.post('/api/laser-setups', {
    data: {
      name: `E2E Ti:Sa ${stamp}`,
      room: 'C1.05',
      sourceType: 'mode_locked',
      wavelengthsNm: [800],
      harmonicOrders: [2],
      pulseDurationFs: 100,
      repRateHz: 80e6,
      maxAvgPowerMw: 1000,
      beamDiameterMm: 2,
      divergenceMrad: 1,
      laserClass: '4',
      eyewear: [{ description: 'NIR goggle KG-7', bandsNm: '740–1100', od: 6, en207: 'DIRM 740-1100 LB6' }],
      interlocks: 'Door interlock and key switch',
      controlledAreaNotes: 'Warning light on while the shutter is open',
    },
  })
  expect(res.status(), await res.text()).toBe(201)
  const body = (await res.json()) as { id: number; code: string; name: string }
  expect((await optics.post(`/api/laser-setups/${body.id}/submit`, { data: {} })).status()).toBe(200)
  await optics.dispose()
  return body
}

test('the safety officer approves a waiting setup from the queue; the optics person can then pick it', async ({
  page,
}) => {
  test.setTimeout(120_000)
  const setup = await makeWaitingSetup(`${Date.now()}`)

  // A waiting setup cannot be picked for a session yet.
  await signIn(page, demo('optics').email)
  await page.goto('/measurements/new')
  await page.getByLabel('Laser setup').click()
  await page.getByLabel('Laser setup').pressSequentially(setup.name.slice(-8))
  const waitingOption = page.getByRole('option', { name: new RegExp(setup.name) })
  await expect(waitingOption).toContainText('Not available: waiting for sign-off')
  await expect(waitingOption).toHaveAttribute('aria-disabled', 'true')
  await page.keyboard.press('Escape')
  await signOut(page)

  // The safety officer's desk: the queue.
  await signIn(page, demo('safety').email)
  await page.goto('/laser-safety')
  const item = page.getByTestId(`queue-${setup.code}`)
  await expect(item).toBeVisible()
  await expect(page.getByTestId('laser-caution').first()).toBeVisible()
  await screen(page, 'safety-queue')
  await item.getByRole('button', { name: 'Approve' }).click()
  const expiresOn = new Date(Date.now() + 180 * 86400_000).toISOString().slice(0, 10)
  await page.getByLabel('Sign-off expires on').fill(expiresOn)
  await page.getByLabel(/Note/).fill('Enclosure, interlock and eyewear checked on site')
  await screen(page, 'safety-approve-dialog')
  await page.getByRole('dialog').getByRole('button', { name: 'Approve' }).click()
  await expect(page.getByText(`${setup.code}: signed off until ${expiresOn}`)).toBeVisible()
  await expect(page.getByTestId(`queue-${setup.code}`)).toHaveCount(0)

  // Its detail: status, history, figures with formulas, the 400 nm warning and the caution.
  await page.goto(`/laser-setups/${setup.id}`)
  await expect(page.getByTestId('signoff-chip').first()).toContainText(`Signed off · until ${expiresOn}`)
  await expect(page.getByText(/Approved by Jonas Abara/)).toBeVisible()
  const figures = page.getByTestId('setup-figures')
  await expect(figures.getByText(/OD = log10/).first()).toBeVisible()
  await expect(figures.getByText('D 800 LB5 + M 800 LB4')).toBeVisible()
  await expect(figures.getByRole('alert').filter({ hasText: 'No eyewear covers 400 nm' })).toBeVisible()
  await expect(page.getByTestId('laser-caution').first()).toContainText('indicative')
  await screen(page, 'safety-setup-detail')
  await page.setViewportSize({ width: 800, height: 1280 })
  await screen(page, 'safety-setup-detail-tablet')
  await page.setViewportSize({ width: 1440, height: 900 })
  await signOut(page)

  // The optics person now sees it selectable, with its safety notes and the confirmation box.
  await signIn(page, demo('optics').email)
  await page.goto('/measurements/new')
  await page.getByLabel('Laser setup').click()
  await page.getByLabel('Laser setup').pressSequentially(setup.name.slice(-8))
  const option = page.getByRole('option', { name: new RegExp(setup.name) })
  await expect(option).not.toHaveAttribute('aria-disabled', 'true')
  await option.click()
  await expect(page.getByText(`Safety notes of ${setup.code}`)).toBeVisible()
  await expect(page.getByText('Door interlock and key switch')).toBeVisible()
  await expect(page.getByRole('checkbox', { name: /I have read this setup's safety notes/ })).toBeVisible()
  await screen(page, 'safety-session-picker')
})
