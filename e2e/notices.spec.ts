import { expect, request, test, type Page } from '@playwright/test'
import { areaNav, demo, DEMO_PASSWORD, screen, signIn, signOut } from './fixtures'

// E-mail notices: a hand-off mail reaches the person (seen by the admin in the outbox and its
// queue), and that person turns notices off in My account. Data is made fresh per run.
const uid = () => `${Date.now().toString(36)}${Math.random().toString(36).slice(2, 6)}`.toUpperCase()
const baseURL = process.env.E2E_BASE_URL ?? 'http://127.0.0.1:3000'
test.use({ actionTimeout: 20_000, navigationTimeout: 30_000 })

/** Set a demo person's own notice preference through the API (so the journey starts and ends the same). */
async function setNotices(email: string, notifyByMail: boolean): Promise<void> {
  const api = await request.newContext({ baseURL })
  expect((await api.post('/api/auth/login', { data: { email, password: DEMO_PASSWORD } })).ok()).toBeTruthy()
  expect((await api.patch('/api/auth/preferences', { data: { notifyByMail } })).ok()).toBeTruthy()
  await api.dispose()
}

async function makeChipAndBox(page: Page, tag: string) {
  const post = async (path: string, data: object) => {
    const r = await page.request.post(path, { data })
    expect(r.ok(), await r.text()).toBeTruthy()
    return r.json()
  }
  const m = await post('/api/materials', { name: `E2E LN ${tag}`, formula: 'LiNbO3', pointGroup: '3m' })
  const w = await post('/api/wafers', {
    materialId: m.id,
    cutNormal: [0, 0, 1],
    flatDirection: [1, 0, 0],
    diameterMm: 76.2,
    thicknessUm: 500,
    lot: `N-${tag}`,
  })
  const { chips } = await post(`/api/wafers/${w.id}/dice`, { count: 1, widthMm: 10, heightMm: 10, rotationDeg: 0 })
  const room = await post('/api/locations', { kind: 'room', name: `Optics lab ${tag}` })
  const cabinet = await post('/api/locations', { kind: 'cabinet', name: 'Dry cabinet', parentId: room.id })
  const box = await post('/api/locations', { kind: 'box', name: 'Hand-off tray', parentId: cabinet.id })
  return { chip: chips[0] as { code: string }, box: box as { id: number } }
}

test('a chip handed to the optics person is mailed; she turns notices off in My account', async ({ page }) => {
  test.setTimeout(240_000)
  const optics = demo('optics')
  await setNotices(optics.email, true)
  try {
    // 1. The fab technician moves a chip into a tray and hands it to the optics person.
    await signIn(page, demo('fab').email)
    const { chip, box } = await makeChipAndBox(page, uid())
    await page.goto(`/locations/${box.id}`)
    await page.getByRole('button', { name: 'Move here' }).click()
    const dialog = page.getByRole('dialog')
    await dialog.getByLabel('Item code').fill(chip.code)
    await dialog.getByLabel('Hand to (optional)').fill('Priya')
    await page.getByRole('option', { name: optics.name }).click()
    await dialog.getByLabel('Note').fill('Ready for the <SHG> run')
    await screen(page, 'notices-handoff-dialog')
    await dialog.getByRole('button', { name: 'Move here' }).click()
    await expect(page.getByText(new RegExp(`${chip.code} moved to .* and handed to ${optics.name}`))).toBeVisible()
    await dialog.getByRole('button', { name: 'Done' }).click()
    await expect(dialog).toBeHidden()
    await signOut(page)

    // 2. The admin sees the hand-off mail in the outbox (it goes through the queue to the local sink).
    await signIn(page, demo('admin').email)
    await areaNav(page)
      .getByRole('link', { name: /Mail outbox/ })
      .click()
    const message = page.getByRole('link', { name: new RegExp(`${chip.code} was handed to you`) })
    await expect(async () => {
      await page.getByRole('button', { name: 'Refresh' }).click()
      await expect(message).toBeVisible({ timeout: 1_000 })
    }).toPass({ timeout: 30_000 })
    await expect(message).toContainText(`To ${optics.email}`)
    await screen(page, 'notices-outbox')
    await message.click()
    await expect(page.getByRole('heading', { level: 1 })).toContainText(`${chip.code} was handed to you`)
    await expect(page.getByText('Note: Ready for the <SHG> run')).toBeVisible()
    await expect(page.getByText(/turn off "Mail notices" in My account/)).toBeVisible()
    await screen(page, 'notices-handoff-message')
    await page.goto('/mail?tab=queue')
    const row = page.getByRole('row', { name: new RegExp(`${chip.code} was handed to you`) })
    await expect(row).toContainText('Sent')
    await expect(page.getByRole('button', { name: 'Send digest now' })).toBeVisible()
    await screen(page, 'notices-queue')
    await page.getByRole('button', { name: 'Send digest now' }).click()
    await expect(page.getByText(/Digest queued for \d+ group lead/)).toBeVisible()
    await expect(page.getByRole('row', { name: /lab digest/ }).first()).toBeVisible()
    await page.setViewportSize({ width: 800, height: 1280 })
    await screen(page, 'notices-queue-tablet')
    await page.setViewportSize({ width: 1440, height: 900 })
    await signOut(page)

    // 3. The optics person turns mail notices off in My account.
    await signIn(page, optics.email)
    await page.goto('/account')
    const toggle = page.getByRole('switch', { name: 'Mail notices' })
    await expect(toggle).toHaveAttribute('aria-checked', 'true')
    await screen(page, 'notices-account-on')
    await toggle.click()
    await expect(page.getByText('Mail notices are off')).toBeVisible()
    await expect(toggle).toHaveAttribute('aria-checked', 'false')
    await page.reload()
    await expect(page.getByRole('switch', { name: 'Mail notices' })).toHaveAttribute('aria-checked', 'false')
    await screen(page, 'notices-account-off')
    await page.setViewportSize({ width: 800, height: 1280 })
    await screen(page, 'notices-account-off-tablet')
  } finally {
    await setNotices(optics.email, true)
  }
})
