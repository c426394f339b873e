import { expect, test } from '@playwright/test'
import { areaNav, demo, screen, signIn, signOut } from './fixtures'

// Audit journey: the fab technician changes a wafer's notes (with a reason); the group lead finds
// that change in the audit trail by the wafer's code and reads the before → after.
const uid = () => `${Date.now().toString(36)}${Math.random().toString(36).slice(2, 6)}`.toUpperCase()

test('a group lead finds a wafer note change in the audit trail, with before and after', async ({ page }) => {
  test.setTimeout(120_000)
  const tag = uid()
  await signIn(page, demo('fab').email)
  const material = await page.request.post('/api/materials', {
    data: { name: `E2E audit GaAs ${tag}`, formula: 'GaAs', pointGroup: '-43m', coefficients: [] },
  })
  expect(material.status()).toBe(201)
  const materialId = (await material.json()).id
  const waferBody = {
    materialId,
    cutNormal: [0, 0, 1],
    flatDirection: [1, -1, 0],
    diameterMm: 50.8,
    thicknessUm: 350,
    lot: `LOT-${tag}`,
    supplier: 'Kestrel test stock',
  }
  const created = await page.request.post('/api/wafers', { data: waferBody })
  expect(created.status()).toBe(201)
  const wafer = await created.json()
  const notes = `Edge chip near the flat, seen at inspection ${tag}`
  const updated = await page.request.patch(`/api/wafers/${wafer.id}`, {
    data: { ...waferBody, notes, reason: 'Inspection after cleaning' },
  })
  expect(updated.status()).toBe(200)
  // The fab technician has no audit search in the menu.
  await expect(areaNav(page).getByText('Audit trail')).toHaveCount(0)
  await signOut(page)

  await signIn(page, demo('lead').email)
  await areaNav(page).getByText('Audit trail').click()
  await expect(page.getByRole('heading', { name: 'Audit trail' })).toBeVisible()
  await page.getByLabel('Record code or material name').fill(wafer.code.toLowerCase())
  const table = page.locator('.ot-audit-table')
  await expect(table.locator('tbody tr[data-audit-id]')).toHaveCount(2)
  const updateRow = table.locator('tbody tr[data-audit-id]').filter({ hasText: 'Changed' })
  await expect(updateRow).toContainText('Tomasz Lindqvist')
  await expect(updateRow).toContainText(wafer.code)
  await expect(updateRow).toContainText('Inspection after cleaning')
  await updateRow.getByRole('button', { name: 'Show changes' }).click()
  const detail = table.locator('tr.ot-audit-detail')
  await expect(detail.getByRole('rowheader', { name: 'Notes' })).toBeVisible()
  await expect(detail.locator('.ot-audit-before')).toContainText('empty')
  await expect(detail.locator('.ot-audit-after')).toContainText(notes)
  await screen(page, 'audit-search-desk')

  await page.setViewportSize({ width: 800, height: 1280 })
  await screen(page, 'audit-search-tablet')

  // The record link opens the wafer; its History shows the same change.
  const link = updateRow.getByRole('link', { name: wafer.code })
  await expect(link).toHaveAttribute('href', `/wafers/${wafer.id}`)
  await page.goto(`/wafers/${wafer.id}`)
  const history = page.getByRole('region', { name: 'History of this wafer' })
  await expect(history.locator('[data-action="update"]')).toContainText('Inspection after cleaning')
  await expect(history.locator('[data-action="update"] .ot-audit-after')).toContainText(notes)
  await history.scrollIntoViewIfNeeded()
  await screen(page, 'audit-wafer-history-tablet')
})
