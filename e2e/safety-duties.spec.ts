import { expect, request as playwrightRequest, test } from '@playwright/test'
import { DEMO_PASSWORD, demo, screen, signIn } from './fixtures'

const BASE = process.env.E2E_BASE_URL ?? 'http://127.0.0.1:3000'

test('the optics person saves a draft (Enter adds a wavelength, never submits), completes it and submits it', async ({
  page,
}) => {
  test.setTimeout(120_000)
  const name = `Draft green bench ${Date.now()}`
  await signIn(page, demo('optics').email)
  await page.goto('/laser-setups')
  await page.getByRole('button', { name: 'New setup' }).click()
  const dialog = page.getByRole('dialog')
  await dialog.getByLabel('Name').fill(name)
  await dialog.getByLabel('Room').fill('C1.07')
  await dialog.getByLabel('Source type').click()
  await page.getByRole('option', { name: /continuous/i }).click()
  const wavelengths = dialog.getByLabel('Wavelengths (nm)')
  await wavelengths.fill('532')
  await wavelengths.press('Enter')
  // Enter added the value as a chip; the dialog is still open and nothing was saved.
  await expect(dialog).toBeVisible()
  await expect(dialog.locator('.q-chip', { hasText: '532' })).toBeVisible()
  await dialog.getByLabel('Max. average power').fill('40')
  await screen(page, 'laser-draft-dialog')
  await dialog.getByRole('button', { name: 'Save draft' }).click()

  // The draft's page: not in the queue, the missing fields listed, Submit disabled until complete.
  await expect(page.getByTestId('draft-banner')).toContainText('This setup is a draft')
  await expect(page.getByTestId('signoff-chip').first()).toContainText('Draft, not submitted')
  const missing = page.getByRole('list', { name: 'Missing before it can be submitted' })
  await expect(missing).toContainText('Give the beam diameter at the exit')
  await expect(missing).toContainText('List the eyewear used with this setup')
  await expect(page.getByRole('button', { name: 'Submit for sign-off' })).toBeDisabled()
  await screen(page, 'laser-draft-page')

  await page.getByRole('button', { name: 'Edit' }).click()
  await dialog.getByLabel('Beam diameter').fill('1.5')
  await dialog.getByRole('button', { name: 'Add eyewear' }).click()
  await dialog.getByRole('textbox', { name: 'Eyewear', exact: true }).fill('Green-blocking goggle GB-3')
  const bands = dialog.getByRole('textbox', { name: 'Bands' })
  await bands.fill('520–545')
  await bands.press('Enter')
  await expect(dialog).toBeVisible()
  await dialog.getByRole('spinbutton', { name: 'OD', exact: true }).fill('5')
  await dialog.getByLabel('Interlocks').fill('Key switch and shutter on the door')
  await dialog.getByRole('button', { name: 'Save draft' }).click()
  await expect(dialog).toBeHidden()
  await page.getByRole('button', { name: 'Submit for sign-off' }).click()
  await expect(page.getByTestId('signoff-chip').first()).toContainText('Waiting for sign-off')
  await expect(page.getByTestId('draft-banner')).toHaveCount(0)
  await screen(page, 'laser-submitted')
})

test('a safety officer does not see Approve on their own setup, and is told why', async ({ page }) => {
  test.setTimeout(120_000)
  const api = await playwrightRequest.newContext({ baseURL: BASE, extraHTTPHeaders: { Origin: BASE } })
  expect(
    (await api.post('/api/auth/login', { data: { email: demo('safety').email, password: DEMO_PASSWORD } })).ok(),
  ).toBeTruthy()
  const res = await api.post('/api/laser-setups', {
    data: {
      name: `Own bench ${Date.now()}`,
      room: 'B2.14',
      sourceType: 'cw',
      wavelengthsNm: [633],
      maxAvgPowerMw: 5,
      beamDiameterMm: 1,
      eyewear: [{ description: 'Red goggle RG-1', bandsNm: '620–650', od: 3 }],
      interlocks: 'Key switch',
    },
  })
  expect(res.status()).toBe(201)
  const own = (await res.json()) as { id: number; code: string }
  expect((await api.post(`/api/laser-setups/${own.id}/submit`, { data: {} })).status()).toBe(200)
  await api.dispose()

  await signIn(page, demo('safety').email)
  await page.goto(`/laser-setups/${own.id}`)
  await expect(page.getByTestId('approval-reason')).toContainText(
    'You described this setup, so another safety officer must approve it',
  )
  await expect(page.getByRole('button', { name: 'Reject' })).toBeVisible()
  await expect(page.getByRole('button', { name: 'Approve' })).toHaveCount(0)
  await expect(page.getByTestId('laser-caution').first()).toBeVisible()
  await screen(page, 'laser-own-setup-no-approve')
  await page.setViewportSize({ width: 820, height: 1180 })
  await screen(page, 'laser-own-setup-no-approve-tablet')

  await page.goto('/laser-safety')
  const item = page.getByTestId(`queue-${own.code}`)
  await expect(item.getByTestId('approval-reason')).toContainText('another safety officer')
  await expect(item.getByRole('button', { name: 'Approve' })).toHaveCount(0)
})
