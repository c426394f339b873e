import { expect, test, type Page } from '@playwright/test'
import { demo, screen, signIn } from './fixtures'

// Careless input in a form dialog: every field that is wrong is flagged at once, in plain words, on
// the field itself; what only the server can judge comes back on its field too.
const uid = () => `${Date.now().toString(36)}${Math.random().toString(36).slice(2, 6)}`.toUpperCase()

/** The Quasar field (input, picker or fieldset) labelled `label` inside the open dialog. */
const field = (page: Page, label: string) =>
  page
    .getByRole('dialog')
    .locator('.q-field, fieldset', { has: page.getByLabel(label, { exact: true }) })
    .first()

test('register a wafer carelessly: all mistakes are flagged together, then the server flags the flat', async ({
  page,
}) => {
  const name = `E2E GaAs ${uid()}`
  await signIn(page, demo('fab').email)
  const res = await page.request.post('/api/materials', { data: { name, formula: 'GaAs', pointGroup: '-43m' } })
  expect(res.status()).toBe(201)

  await page.goto('/inventory')
  await page.getByRole('button', { name: 'Register wafer' }).click()
  const dialog = page.getByRole('dialog')
  await dialog.getByLabel('Diameter', { exact: true }).fill('')
  await dialog.getByLabel('Thickness', { exact: true }).fill('99999')
  await dialog.getByLabel('Lot', { exact: true }).fill('L'.repeat(61))
  await dialog.getByRole('button', { name: 'Register wafer' }).click()

  // No material picked, no diameter, too thick, too long a lot: all four at once.
  await expect(field(page, 'Material')).toContainText('Pick the material')
  await expect(field(page, 'Diameter')).toContainText('Required')
  await expect(field(page, 'Thickness')).toContainText('At most 5000 µm')
  await expect(field(page, 'Lot')).toContainText('At most 60 characters')
  await expect(dialog.locator('.q-field--error')).toHaveCount(4)
  await screen(page, 'form-errors-wafer-careless')

  // Fixed, but with the flat along the cut normal: only the server judges that, and says so on the flat.
  await dialog.getByLabel('Material', { exact: true }).fill(name)
  await page
    .getByRole('option', { name: new RegExp(name) })
    .first()
    .click()
  await dialog.getByLabel('Diameter', { exact: true }).fill('50.8')
  await dialog.getByLabel('Thickness', { exact: true }).fill('350')
  await dialog.getByLabel('Lot', { exact: true }).fill(`LOT-${uid()}`)
  await dialog.getByRole('button', { name: 'Cut normal (h k l): (001)' }).click()
  for (const [k, v] of [
    ['h', '0'],
    ['k', '0'],
    ['l', '1'],
  ])
    await dialog.getByLabel(`Primary flat direction ${k}`).fill(v)
  await expect(dialog.locator('.q-field--error')).toHaveCount(0)
  await dialog.getByRole('button', { name: 'Register wafer' }).click()
  const flat = dialog.locator('fieldset', { hasText: 'Primary flat direction' })
  await expect(flat.getByRole('alert')).toContainText('must lie in the wafer surface')
  await expect(dialog.locator('.q-banner')).toHaveCount(0)
  await screen(page, 'form-errors-wafer-server')
})

test('a coefficient over the limit reads "At most 1 000 000 pm/V", on its row', async ({ page }) => {
  const name = `E2E GaAs ${uid()}`
  await signIn(page, demo('fab').email)
  const res = await page.request.post('/api/materials', { data: { name, formula: 'GaAs', pointGroup: '-43m' } })
  const { id } = await res.json()
  // The server words it the same way.
  const over = await page.request.patch(`/api/materials/${id}`, {
    data: {
      name,
      formula: 'GaAs',
      pointGroup: '-43m',
      coefficients: [{ component: 'd14', order: 2, valuePmV: 2e6, wavelengthNm: 1064, source: 'x' }],
    },
  })
  expect(over.status()).toBe(400)
  expect((await over.json()).fields['coefficients.0.valuePmV']).toEqual(['At most 1\u00a0000\u00a0000 pm/V'])

  await page.goto(`/materials/${id}`)
  await page.getByRole('button', { name: 'Edit' }).click()
  await page.getByRole('button', { name: 'Add a coefficient' }).click()
  const row = page.getByTestId('coef-row-0')
  await row.getByLabel('Value').fill('2000000')
  await page.getByRole('button', { name: 'Save material' }).click()
  await expect(row.locator('.q-field--error', { has: page.getByLabel('Value') })).toContainText(
    'At most 1 000 000 pm/V',
  )
  await expect(row.locator('.q-field--error', { has: page.getByLabel('Source') })).toContainText(
    'Say where the value comes from',
  )
  await screen(page, 'form-errors-material-coefficient')
})
