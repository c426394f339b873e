import { expect, test } from '@playwright/test'
import ExcelJS from 'exceljs'
import { demo, screen, signIn } from './fixtures'

// Group lead journey: export the inventory (progress, then a download), then dry-run a legacy
// spreadsheet with one bad row: the row shows red with its reason and the import stays disabled.
const uid = () => `${Date.now().toString(36)}${Math.random().toString(36).slice(2, 6)}`.toUpperCase()

async function legacyWorkbook(material: string): Promise<Buffer> {
  const book = new ExcelJS.Workbook()
  const lot = `E2E-${uid()}`
  book.addWorksheet('Wafers').addRows([
    ['Ref', 'Material', 'Cut normal', 'Flat direction', 'Diameter (mm)', 'Thickness (µm)', 'Lot'],
    ['W1', material, '0 0 1', '1 -1 0', 50.8, 350, lot],
    ['W2', material, '0 0 1', '1 -1 0', 'two inch', 350, lot],
  ])
  book.addWorksheet('Chips').addRows([
    ['Ref', 'Wafer', 'Width (mm)', 'Height (mm)'],
    ['W1-01', 'W1', 5, 5],
  ])
  book.addWorksheet('Arrays').addRows([
    ['Chip', 'Position', 'Shape', 'Lattice', 'Dimensions (nm)', 'Period X (nm)'],
    ['W1-01', 'A1', 'disk', 'square', 'diameterNm=450', 900],
  ])
  return Buffer.from(await book.xlsx.writeBuffer())
}

for (const size of [
  { width: 1440, height: 900, tag: 'desk' },
  { width: 800, height: 1280, tag: 'tablet' },
]) {
  test(`a group lead exports the inventory and dry-runs a sheet with one bad row (${size.tag})`, async ({ page }) => {
    test.setTimeout(180_000)
    await page.setViewportSize({ width: size.width, height: size.height })
    await signIn(page, demo('lead').email)
    if (size.tag === 'desk') await page.getByRole('link', { name: /Export & import/ }).click()
    else await page.goto('/excel')
    await expect(page.getByRole('heading', { name: 'Export & import' })).toBeVisible()

    await page.getByRole('button', { name: 'Export inventory' }).click()
    await expect(page.getByLabel('Export progress')).toBeVisible()
    await screen(page, `excel-export-progress-${size.tag}`)
    const download = page.getByRole('link', { name: /Download overtone-inventory-.*\.xlsx/ })
    await expect(download).toBeVisible({ timeout: 120_000 })
    await screen(page, `excel-export-ready-${size.tag}`)
    const [file] = await Promise.all([page.waitForEvent('download'), download.click()])
    expect(file.suggestedFilename()).toMatch(/^overtone-inventory-\d{8}-\d{4}\.xlsx$/)

    const materials = await (await page.request.get('/api/materials?pageSize=5')).json()
    const bytes = await legacyWorkbook(materials.rows[0].name)
    await page.getByLabel('Workbook (.xlsx, up to 20 MB)').setInputFiles({
      name: 'legacy-lab-book.xlsx',
      mimeType: 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet',
      buffer: bytes,
    })
    const bad = page.locator('tr[data-status="error"]')
    await expect(bad).toHaveCount(1)
    await expect(bad).toContainText('Diameter (mm): expected a number in mm, found text "two inch"')
    await expect(page.locator('tr[data-status="create"]')).toHaveCount(3)
    await expect(page.getByRole('alert').filter({ hasText: 'problem(s) found' })).toBeVisible()
    await expect(page.locator('[data-test="import-button"]')).toBeDisabled()
    await expect(page.locator('[data-test="import-button"]')).toContainText('Import (fix the file first)')
    await expect(page.locator('[data-test="sheet-Wafers"]')).toContainText('1 to create')
    await screen(page, `excel-import-dry-run-${size.tag}`)
    await page.getByText('Errors and conflicts only').click()
    await expect(page.locator('tbody tr[data-status]')).toHaveCount(1)
    await screen(page, `excel-import-errors-only-${size.tag}`)
  })
}
