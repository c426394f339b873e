import { expect, test } from '@playwright/test'
import { demo, screen, signIn } from './fixtures'

/**
 * The crystal-patterns page at oblique incidence. (001) zinc blende: nothing at normal incidence
 * (the bulk SH polarisation is along the normal), at 45° p-p, p-s and s-p are four-lobed and s-s is
 * empty (T. Stehlin et al., Opt. Lett. 13, 389 (1988)); an isotropic surface term adds a two-fold
 * part to p-p (X. Song et al., arXiv:physics/0203023).
 */
for (const viewport of [
  { width: 1440, height: 900, tag: 'desk' },
  { width: 800, height: 1280, tag: 'tablet' },
]) {
  test(`oblique-incidence polar patterns (${viewport.tag})`, async ({ page }) => {
    test.setTimeout(60_000)
    await page.setViewportSize(viewport)
    await signIn(page, demo('optics').email)
    await page.goto('/channels/patterns')
    await expect(page.getByRole('heading', { name: 'Polar patterns of a crystal', level: 1 })).toBeVisible()

    await page.getByLabel('Point group').click()
    await page.getByRole('option', { name: '-43m', exact: true }).click()
    await page.getByLabel('Cut normal [h, k, l]').fill('0, 0, 1')
    await page.getByLabel('In-plane reference (θ = 0)').fill('1, 0, 0')
    await page.getByRole('button', { name: 'Predict', exact: true }).click()

    const oblique = page.getByTestId('oblique-patterns')
    await expect(oblique.getByRole('heading', { name: 'Oblique incidence (rotational anisotropy)' })).toBeVisible()
    await expect(page.getByTestId('oblique-pp')).toContainText('Fourier orders of I(φ): 0, 4')
    await expect(page.getByTestId('oblique-ps')).toContainText('Fourier orders of I(φ): 0, 4')
    await expect(page.getByTestId('oblique-sp')).toContainText('Fourier orders of I(φ): 0, 4')
    await expect(page.getByTestId('oblique-ss')).toContainText('nothing is detected')
    await expect(
      page.getByTestId('oblique-pp').getByRole('img', { name: 'Predicted pattern, p-in / p-out' }),
    ).toBeVisible()
    await expect(page.getByTestId('oblique-geometry')).toContainText('bulk (crystal axes) xyz = 1')
    await screen(page, `crystal-patterns-oblique-${viewport.tag}`)

    // Normal incidence on (001): nothing in any combination.
    await oblique.getByLabel('Angle of incidence').fill('0')
    await oblique.getByRole('button', { name: 'Predict oblique patterns' }).click()
    await expect(page.getByTestId('oblique-pp')).toContainText('nothing is detected')

    // An isotropic surface term interferes with the bulk in p-p.
    await oblique.getByLabel('Angle of incidence').fill('45')
    await oblique.getByText('Isotropic surface term (∞m)').click()
    await oblique.getByLabel('Surface weights').fill('zzz = 0.4, zxx = 0.1, xxz = 0.05')
    await oblique.getByRole('button', { name: 'Predict oblique patterns' }).click()
    await expect(page.getByTestId('oblique-pp')).toContainText('Fourier orders of I(φ): 0, 2, 4')

    // Bad input comes back as a red hint under its field.
    await oblique.getByLabel('Surface weights').fill('qqq = 1')
    await oblique.getByRole('button', { name: 'Predict oblique patterns' }).click()
    await expect(oblique.getByText(/not an independent element/).first()).toBeVisible()
    await expect(oblique.getByText(/surfaceCoefficients\.qqq:/)).toHaveCount(0)
    await expect(oblique.locator('.q-banner.bg-negative')).toHaveCount(0)
    await screen(page, `crystal-patterns-oblique-error-${viewport.tag}`)
  })
}
