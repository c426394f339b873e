import { expect, test, type Page } from '@playwright/test'
import { demo, screen, signIn } from './fixtures'

const calc = (page: Page) => page.getByRole('form', { name: 'Channel request' })

/**
 * Harmonic-channel calculator: a cubic (001) disk forbids SHG along the normal; (111) + triangle allows it
 * counter-rotating.
 */
async function resultShows(page: Page, allowedM: string[], normal: RegExp): Promise<void> {
  const result = page.getByTestId('channel-result')
  await expect(result.getByText(normal)).toBeVisible()
  for (const m of allowedM)
    await expect(result.locator('.q-chip', { hasText: new RegExp(`^${m.replace('+', '\\+')}$`) })).toBeVisible()
}

for (const viewport of [
  { width: 1440, height: 900, tag: 'desk' },
  { width: 800, height: 1280, tag: 'tablet' },
]) {
  test(`channel calculator and planner (${viewport.tag})`, async ({ page }) => {
    test.setTimeout(90_000)
    await page.setViewportSize(viewport)
    await signIn(page, demo('optics').email)
    await page.goto('/channels')
    await expect(page.getByRole('heading', { name: 'Harmonic channels', level: 1 })).toBeVisible()

    // Defaults: GaAs (-43m), (001) with x ∥ [110], disk, circular m = +1, SHG.
    await calc(page).getByRole('group', { name: 'Material quick picks' }).getByText('GaAs').click()
    await calc(page).getByRole('group', { name: 'Cut quick picks' }).getByText('(001), x ∥ [110]').click()
    await resultShows(page, ['0', '+4'], /Along the normal:\s*forbidden/)
    await expect(page.getByTestId('channel-result').locator('.q-chip', { hasText: /^\+1$|^−1$/ })).toHaveCount(0)
    await expect(page).toHaveURL(/pg=-43m/)
    await screen(page, `channels-001-disk-${viewport.tag}`)

    // (111) cut with a triangular meta-atom: counter-rotating emission along the normal.
    await calc(page).getByRole('group', { name: 'Cut quick picks' }).getByText('(111), x ∥ [1-10]').click()
    // Picked at once, while the cut's result and URL are still being updated: the open menu and the pick must hold.
    await page.getByLabel('Meta-atom shape').click()
    await page.getByRole('option', { name: 'triangle', exact: true }).click()
    await expect(page.getByTestId('structure-derived')).toContainText('C3v')
    await resultShows(page, ['−1', '+2'], /Along the normal:\s*allowed: counter-rotating/)
    await expect(page).toHaveURL(/shape=triangle/)
    await expect(page.getByTestId('channel-result').locator('ol li').first()).toBeVisible()
    await screen(page, `channels-111-triangle-${viewport.tag}`)

    // The URL reproduces the request.
    await page.reload()
    await resultShows(page, ['−1'], /Along the normal:\s*allowed: counter-rotating/)

    // A bad direction comes back as a red hint under its field.
    await page.getByLabel('Cut normal').fill('(1x1)')
    await expect(page.getByText(/cannot read direction/).first()).toBeVisible()
    await expect(page.getByTestId('result-needs-fix')).toBeVisible()
    await expect(page.getByText(/crystal\.normal:/)).toHaveCount(0)
    await screen(page, `channels-field-error-${viewport.tag}`)

    // Planner: rank options for co-rotating emission.
    await page.getByRole('button', { name: 'Rank the options' }).click()
    await expect(page.getByTestId('planner-table')).toBeVisible()
    await screen(page, `channels-planner-${viewport.tag}`)
  })
}
