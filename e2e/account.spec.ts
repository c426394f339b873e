import { expect, test } from '@playwright/test'
import { demo, screen, signIn } from './fixtures'

test('changing the password with a wrong current password shows a red hint under that field', async ({ page }) => {
  await signIn(page, demo('safety').email)
  await page.getByRole('link', { name: 'My account' }).click()
  await expect(page.getByRole('heading', { name: 'My account' })).toBeVisible()
  await page.getByLabel('Current password').fill('this-is-not-it')
  await page.getByLabel('New password', { exact: true }).fill('a longer new passphrase')
  await page.getByLabel('Repeat the new password').fill('a longer new passphrase')
  await page.getByRole('button', { name: 'Change password' }).click()
  const current = page.locator('.q-field', { has: page.getByLabel('Current password') })
  await expect(current).toHaveClass(/q-field--error/)
  await expect(current.locator('.q-field__messages')).not.toBeEmpty()
  await screen(page, 'account-wrong-current-password')
})

test('the search box finds a person by name and opens them', async ({ page }) => {
  const lead = demo('lead')
  await signIn(page, demo('admin').email)
  const search = page.getByRole('combobox', { name: 'Search' })
  await search.fill('Okafor')
  const hit = page.getByRole('option', { name: new RegExp(lead.name) })
  await expect(hit).toBeVisible()
  await screen(page, 'search-person')
  await search.press('ArrowDown')
  await search.press('Enter')
  await expect(page).toHaveURL(/\/people/)
  await expect(page.getByRole('row', { name: new RegExp(lead.name) })).toBeVisible()
})

test('dark mode is remembered on this device', async ({ page }) => {
  await signIn(page, demo('optics').email)
  await page.getByRole('button', { name: 'Switch to dark mode' }).click()
  await expect(page.locator('body')).toHaveClass(/body--dark/)
  await page.reload()
  await expect(page.locator('body')).toHaveClass(/body--dark/)
  await page.getByRole('link', { name: /Laser safety/ }).click()
  await expect(page.getByRole('note')).toContainText('indicative')
  await screen(page, 'dark-laser-safety')
  await page.getByRole('button', { name: 'Switch to light mode' }).click()
  await expect(page.locator('body')).not.toHaveClass(/body--dark/)
})
