import { expect, request, test, type Page } from '@playwright/test'
import { demo, DEMO_PASSWORD, screen, signIn } from './fixtures'

// Sample store journey: register a GaAs (001) wafer, dice it, add a disk array on a square lattice,
// read its channels and drawings, and see the material's d-matrix form. Data is made fresh per run.
const uid = () => `${Date.now().toString(36)}${Math.random().toString(36).slice(2, 6)}`.toUpperCase()

async function createGaAs(page: Page, name: string): Promise<number> {
  const res = await page.request.post('/api/materials', {
    data: {
      name,
      formula: 'GaAs',
      pointGroup: '-43m',
      bandGapEv: 1.42,
      transparencyNote: '0.9–17 µm',
      coefficients: [
        {
          component: 'd14',
          order: 2,
          valuePmV: 170,
          wavelengthNm: 1064,
          source: 'lab handbook value',
          isTypical: true,
        },
      ],
    },
  })
  expect(res.status()).toBe(201)
  return (await res.json()).id
}

async function pickOption(page: Page, label: string, text: string): Promise<void> {
  await page.getByRole('dialog').getByLabel(label, { exact: true }).fill(text)
  await page
    .getByRole('option', { name: new RegExp(text) })
    .first()
    .click()
}

test('a fab technician registers a wafer, dices it, adds an array and reads its channels', async ({ page }) => {
  test.setTimeout(240_000)
  const name = `E2E GaAs ${uid()}`
  await signIn(page, demo('fab').email)
  const materialId = await createGaAs(page, name)

  await page.goto('/inventory')
  await expect(page.getByRole('heading', { name: 'Sample store' })).toBeVisible()
  await screen(page, 'inventory-wafers')

  // register wafer: GaAs (001), flat along [110]
  await page.getByRole('button', { name: 'Register wafer' }).click()
  await pickOption(page, 'Material', name)
  await page.getByRole('dialog').getByRole('button', { name: 'Cut normal (h k l): (001)' }).click()
  await page.getByRole('dialog').getByRole('button', { name: 'Primary flat direction: [110]' }).click()
  await page.getByRole('dialog').getByLabel('Lot', { exact: true }).fill(`LOT-${uid()}`)
  await page.getByRole('dialog').getByLabel('Supplier').fill('Kestrel test stock')
  await screen(page, 'inventory-register-wafer')
  await page.getByRole('dialog').getByRole('button', { name: 'Register wafer' }).click()
  await expect(page).toHaveURL(/\/wafers\/\d+/)
  await expect(page.getByRole('heading', { level: 1 })).toContainText('W-')
  await expect(page.getByText('(001)').first()).toBeVisible()

  // dice 4 chips
  await page.getByRole('button', { name: 'Dice chips' }).click()
  await page.getByRole('dialog').getByLabel('How many').fill('4')
  await page
    .getByRole('dialog')
    .getByRole('button', { name: /Dice 4 chips/ })
    .click()
  await expect(page.getByText(/4 chips diced/)).toBeVisible()
  await expect(page.getByRole('heading', { name: 'Chips (4)' })).toBeVisible()
  await expect(page.locator('tbody tr')).toHaveCount(4)
  await expect(page.getByRole('img', { name: /4 chips/ })).toBeVisible()
  await screen(page, 'inventory-wafer-diced')

  // add an array (disk, square lattice) on the first chip
  await page.locator('tbody tr').first().click()
  await expect(page).toHaveURL(/\/chips\/\d+/)
  await page.getByRole('button', { name: 'Add array' }).click()
  await page.getByRole('dialog').getByLabel('Position on the chip').fill('B2')
  await page.getByRole('dialog').getByRole('radio', { name: 'disk' }).click()
  await page.getByRole('dialog').getByLabel('Diameter').fill('300')
  await page.getByRole('dialog').getByRole('button', { name: 'square', exact: true }).click()
  await page.getByRole('dialog').getByLabel('Period', { exact: true }).fill('600')
  await screen(page, 'inventory-add-array')
  await page.getByRole('dialog').getByRole('button', { name: 'Add array' }).click()

  // the array: symmetry, drawings, channels
  await expect(page).toHaveURL(/\/arrays\/\d+/)
  await expect(page.getByTestId('symmetry')).toContainText('C4v')
  await expect(page.getByRole('img', { name: /Meta-atom disk/ })).toBeVisible()
  await expect(page.getByRole('img', { name: /square lattice patch/ })).toBeVisible()
  const shgCircular = page.getByTestId('channel-2:circular+1')
  await expect(shgCircular.getByTestId('allowed-m')).toContainText('0')
  await expect(shgCircular.getByTestId('allowed-m')).toContainText('+4')
  await expect(shgCircular.getByTestId('allowed-m')).not.toContainText('+1')
  await expect(shgCircular.getByTestId('normal-emission')).toContainText('No emission along the normal')
  // The handedness words are a legend under the table, once per pump, not in every row.
  await expect(shgCircular).not.toContainText('seen from +z')
  await expect(page.getByTestId('handedness-legend')).toContainText('Circular, m = +1: counter-clockwise seen from +z')
  await expect(page.getByTestId('handedness-legend').getByRole('listitem')).toHaveCount(2)
  await shgCircular.getByRole('button', { name: 'Why' }).click()
  await expect(page.getByText(/rule 6/).first()).toBeVisible()
  await screen(page, 'inventory-array-channels')
  await page.setViewportSize({ width: 800, height: 1280 })
  await screen(page, 'inventory-array-tablet')
  await page.setViewportSize({ width: 1440, height: 900 })

  // the material page shows the engine's d-matrix form, and refuses a forbidden coefficient on its row
  await page.goto(`/materials/${materialId}`)
  await expect(page.getByTestId('d-matrix')).toContainText('d14 = d25 = d36')
  await expect(page.getByText('typical, verify for your wavelength')).toBeVisible()
  await screen(page, 'inventory-material-dmatrix')
  await page.getByRole('button', { name: 'Edit' }).click()
  await page.getByRole('button', { name: 'Add a coefficient' }).click()
  const row = page.getByTestId('coef-row-1')
  await row.getByLabel('Component').fill('d33')
  await row.getByLabel('Value').fill('12')
  await row.getByLabel('Source').fill('made up for the test')
  await page.getByRole('button', { name: 'Save material' }).click()
  await expect(row.locator('.q-field--error')).toContainText(/forbids d33/)
  await screen(page, 'inventory-material-forbidden')
})

test('optics staff see the sample store but no write buttons', async ({ page, baseURL }) => {
  test.setTimeout(120_000)
  const fab = await request.newContext({ baseURL })
  await fab.post('/api/auth/login', { data: { email: demo('fab').email, password: DEMO_PASSWORD } })
  const m = await (
    await fab.post('/api/materials', { data: { name: `E2E GaAs ${uid()}`, formula: 'GaAs', pointGroup: '-43m' } })
  ).json()
  const w = await (
    await fab.post('/api/wafers', {
      data: {
        materialId: m.id,
        cutNormal: [0, 0, 1],
        flatDirection: [1, 1, 0],
        diameterMm: 50.8,
        thicknessUm: 350,
        lot: `L-${uid()}`,
      },
    })
  ).json()
  await fab.dispose()

  await signIn(page, demo('optics').email)
  await page.goto('/inventory')
  await expect(page.getByRole('heading', { name: 'Sample store' })).toBeVisible()
  await expect(page.getByRole('button', { name: 'Register wafer' })).toHaveCount(0)
  await page.setViewportSize({ width: 800, height: 1280 })
  await expect(page.locator('tbody tr').first()).toBeVisible()
  await screen(page, 'inventory-tablet-optics')
  await page.setViewportSize({ width: 1440, height: 900 })
  await page.getByRole('tab', { name: 'Arrays' }).click()
  await expect(page.getByRole('button', { name: 'Recompute stale' })).toHaveCount(0)
  await page.getByRole('tab', { name: 'Locations' }).click()
  await expect(page.getByRole('button', { name: 'New location' })).toHaveCount(0)
  // a scanned or typed code opens its record
  await page.getByRole('tab', { name: 'Wafers' }).click()
  await page.getByLabel('Open a record by its code').fill(w.code.toLowerCase())
  await page.getByLabel('Open a record by its code').press('Enter')
  await expect(page).toHaveURL(new RegExp(`/wafers/${w.id}$`))
  await expect(page.getByRole('heading', { level: 1 })).toContainText(w.code)
  for (const label of ['Dice chips', 'Status', 'Retire'])
    await expect(page.getByRole('button', { name: label, exact: true })).toHaveCount(0)
  await screen(page, 'inventory-optics-wafer')
})

test('a fab technician moves a chip into a box by its code and records a process step', async ({ page }) => {
  test.setTimeout(240_000)
  await signIn(page, demo('fab').email)
  const post = async (path: string, data: object) => {
    const r = await page.request.post(path, { data })
    expect(r.ok(), await r.text()).toBeTruthy()
    return r.json()
  }
  const tag = uid()
  const m = await post('/api/materials', { name: `E2E LN ${tag}`, formula: 'LiNbO3', pointGroup: '3m' })
  const w = await post('/api/wafers', {
    materialId: m.id,
    cutNormal: [0, 0, 1],
    flatDirection: [1, 0, 0],
    diameterMm: 76.2,
    thicknessUm: 500,
    lot: `L-${tag}`,
  })
  const { chips } = await post(`/api/wafers/${w.id}/dice`, { count: 2, widthMm: 10, heightMm: 10, rotationDeg: 30 })
  const room = await post('/api/locations', { kind: 'room', name: `Room ${tag}` })
  const cabinet = await post('/api/locations', { kind: 'cabinet', name: 'Cabinet A', parentId: room.id })
  const box = await post('/api/locations', { kind: 'box', name: 'Box 1', parentId: cabinet.id })

  await page.goto('/inventory?tab=locations')
  await page.getByLabel('Filter locations').fill(tag)
  await expect(page.getByText(`Room ${tag}`)).toBeVisible()
  await screen(page, 'inventory-locations-tree')
  await page.getByText('Box 1', { exact: true }).click()
  await expect(page).toHaveURL(new RegExp(`/locations/${box.id}`))
  await page.getByRole('button', { name: 'Move here' }).click()
  // a keyboard-wedge scanner types the code and presses Enter
  await page.getByRole('dialog').getByLabel('Item code').pressSequentially(chips[0].code.toLowerCase(), { delay: 5 })
  await page.getByRole('dialog').getByLabel('Item code').press('Enter')
  await expect(page.getByText(new RegExp(`${chips[0].code} moved to`))).toBeVisible()
  await page.getByRole('button', { name: 'Done' }).click()
  await expect(page.getByRole('link', { name: new RegExp(chips[0].code) })).toBeVisible()
  await screen(page, 'inventory-location-box')

  await page.getByRole('link', { name: new RegExp(chips[0].code) }).click()
  await expect(page.getByText(`Room ${tag} › Cabinet A › Box 1`).first()).toBeVisible()
  await page.getByRole('button', { name: 'Add fab step' }).click()
  const dialog = page.getByRole('dialog')
  await dialog.getByRole('button', { name: 'Etch', exact: true }).click()
  await dialog.getByLabel('Gas').fill('Ar/Cl2')
  await dialog.getByLabel('RF power').fill('100')
  await dialog.getByRole('button', { name: 'Record step' }).click()
  await expect(page.getByText('Gas: Ar/Cl2')).toBeVisible()
  await expect(page.getByText('RF power: 100 W')).toBeVisible()
  await screen(page, 'inventory-chip-detail')

  await page.goto('/fabrication')
  await page.getByLabel('Chip', { exact: true }).fill(chips[0].code)
  await page.getByRole('option', { name: new RegExp(chips[0].code) }).click()
  await expect(page.getByText('Gas: Ar/Cl2')).toBeVisible()
  await screen(page, 'fabrication-chip-steps')
})

test('a fab technician edits a wafer and the history shows the change', async ({ page }) => {
  test.setTimeout(120_000)
  await signIn(page, demo('fab').email)
  const post = async (path: string, data: object) => {
    const r = await page.request.post(path, { data })
    expect(r.ok(), await r.text()).toBeTruthy()
    return r.json()
  }
  const tag = uid()
  const m = await post('/api/materials', { name: `E2E GaAs ${tag}`, formula: 'GaAs', pointGroup: '-43m' })
  const w = await post('/api/wafers', {
    materialId: m.id,
    cutNormal: [0, 0, 1],
    flatDirection: [1, 1, 0],
    diameterMm: 50.8,
    thicknessUm: 350,
    lot: `OLD-${tag}`,
  })

  await page.goto(`/wafers/${w.id}`)
  await expect(page.getByRole('heading', { level: 1 })).toContainText(w.code)
  await page.getByRole('button', { name: 'Edit', exact: true }).click()
  const dialog = page.getByRole('dialog')
  await expect(dialog.getByLabel('Lot', { exact: true })).toHaveValue(`OLD-${tag}`)
  await dialog.getByLabel('Lot', { exact: true }).fill(`NEW-${tag}`)
  await dialog.getByLabel(/Reason for the change/).fill('Supplier relabelled the lot')
  await screen(page, 'inventory-edit-wafer')
  await dialog.getByRole('button', { name: 'Save changes' }).click()
  await expect(dialog).toBeHidden()
  await expect(page.getByText(`NEW-${tag} ·`)).toBeVisible()
  const history = page.getByRole('region', { name: 'History of this wafer' })
  await expect(history.getByText(`NEW-${tag}`)).toBeVisible()
  await expect(history.getByText('Supplier relabelled the lot')).toBeVisible()
  await expect(page.getByRole('heading', { name: /Files/ })).toBeVisible()
  await screen(page, 'inventory-wafer-edited')
})
