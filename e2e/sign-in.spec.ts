import { expect, test } from '@playwright/test'
import { areaNav, DEMO_PEOPLE, demo, screen, signIn, signOut } from './fixtures'

test.describe('sign in and out', () => {
  for (const person of DEMO_PEOPLE) {
    test(`${person.key}: sees name, roles and the right areas`, async ({ page }) => {
      await signIn(page, person.email)
      const header = page.getByRole('banner')
      await expect(header.getByTestId('user-name')).toHaveText(person.name)
      for (const label of person.roleLabels) await expect(header.getByText(label, { exact: true })).toBeVisible()

      const nav = areaNav(page)
      for (const area of [
        'Overview',
        'Sample store',
        'Cleanroom work',
        'Optical measurements',
        'Laser safety',
        'Labels & scanning',
      ]) {
        await expect(nav.getByRole('link', { name: new RegExp(area) })).toBeVisible()
      }
      await expect(nav.getByRole('link', { name: /People/ })).toHaveCount(person.isAdminNavVisible.people ? 1 : 0)
      await expect(nav.getByRole('link', { name: /Mail outbox/ })).toHaveCount(person.isAdminNavVisible.mail ? 1 : 0)
      await screen(page, `home-${person.key}`)

      await signOut(page)
      await page.goto('/')
      await expect(page).toHaveURL(/\/sign-in/)
    })
  }

  test('wrong password shows an error and stays on sign in', async ({ page }) => {
    await page.goto('/sign-in')
    await page.getByLabel('E-mail').fill(demo('fab').email)
    await page.getByLabel('Password').fill('not-the-password')
    await page.getByRole('button', { name: 'Sign in' }).click()
    await expect(page.getByRole('alert')).toContainText(/not right|too many/i)
    await expect(page).toHaveURL(/\/sign-in/)
    await screen(page, 'sign-in-wrong-password')
  })

  test('a page that needs a role shows "not allowed"; an unknown user is sent to sign in first', async ({ page }) => {
    await page.goto('/mail')
    await expect(page).toHaveURL(/\/sign-in\?redirect=/)
    await page.getByLabel('E-mail').fill(demo('fab').email)
    await page.getByLabel('Password').fill('overtone-demo')
    await page.getByRole('button', { name: 'Sign in' }).click()
    await expect(page.getByRole('heading', { name: 'This page is not open to you' })).toBeVisible()
    await screen(page, 'not-allowed-fab')
  })

  test('tablet portrait: the areas fold behind the menu button', async ({ page }) => {
    await page.setViewportSize({ width: 800, height: 1280 })
    await signIn(page, demo('optics').email)
    await expect(areaNav(page)).toBeHidden()
    await page.getByRole('button', { name: 'Show or hide the areas' }).click()
    await expect(areaNav(page).getByRole('link', { name: /Laser safety/ })).toBeVisible()
    await screen(page, 'tablet-drawer-optics')
    await areaNav(page)
      .getByRole('link', { name: /Laser safety/ })
      .click()
    await expect(page.getByRole('note')).toContainText('laser safety officer')
    await expect(areaNav(page)).toBeHidden()
    await screen(page, 'tablet-laser-safety')
  })
})
