import { expect, request as playwrightRequest, test, type APIRequestContext, type Page } from '@playwright/test'
import { DEMO_PASSWORD, demo, screen, signIn, signOut } from './fixtures'

const BASE = process.env.E2E_BASE_URL ?? 'http://127.0.0.1:3000'
const DESK = { width: 1366, height: 768 }
const TABLET = { width: 820, height: 1180 }

async function apiAs(key: string): Promise<APIRequestContext> {
  const api = await playwrightRequest.newContext({ baseURL: BASE, extraHTTPHeaders: { Origin: BASE } })
  const res = await api.post('/api/auth/login', { data: { email: demo(key).email, password: DEMO_PASSWORD } })
  expect(res.ok()).toBeTruthy()
  return api
}

/** Screenshots of the whole page at a desk and a tablet size; nothing may stick out sideways. */
async function atBothSizes(page: Page, name: string): Promise<void> {
  for (const [size, viewport] of [
    ['desk', DESK],
    ['tablet', TABLET],
  ] as const) {
    await page.setViewportSize(viewport)
    await expect(page.getByTestId('panel-' + name.split('-')[0])).toBeVisible()
    const overflow = await page.evaluate(
      () => document.documentElement.scrollWidth - document.documentElement.clientWidth,
    )
    expect(overflow, `${size}: the page scrolls sideways`).toBeLessThanOrEqual(0)
    await screen(page, `overview-${name}-${size}`)
  }
}

test('the fab technician and the optics person each see their own worklists, with counts and links', async ({
  page,
}) => {
  test.setTimeout(120_000)
  // A chip put in process by the fab technician (restored afterwards).
  const fab = await apiAs('fab')
  const list = (await (await fab.get('/api/chips?pageSize=1&sort=code&dir=desc')).json()) as {
    rows: { id: number; code: string; status: string }[]
  }
  const chip = list.rows[0]
  expect(
    (await fab.patch(`/api/chips/${chip.id}`, { data: { status: 'in_process', reason: 'e2e: overview' } })).status(),
  ).toBe(200)
  try {
    await page.setViewportSize(DESK)
    await signIn(page, demo('fab').email)
    const panel = page.getByTestId('panel-fab')
    await expect(panel.getByRole('heading', { name: 'Fab technician' })).toBeVisible()
    await expect(page.getByTestId('panel-optics')).toHaveCount(0)
    await expect(page.getByTestId('panel-admin')).toHaveCount(0)
    const inProcess = page.getByTestId('fab-in-process')
    await expect(inProcess.getByRole('link', { name: new RegExp(chip.code) })).toBeVisible()
    expect(Number(await inProcess.getByTestId('count').textContent())).toBeGreaterThanOrEqual(1)
    await expect(page.getByTestId('fab-recent-steps')).toBeVisible()
    await expect(
      page.getByTestId('fab-unlabelled').getByText('Wafers and chips whose code was never on a printed label'),
    ).toBeVisible()
    await atBothSizes(page, 'fab')

    // The chip's row opens the chip.
    await page.setViewportSize(DESK)
    await inProcess.getByRole('link', { name: new RegExp(chip.code) }).click()
    await expect(page).toHaveURL(new RegExp(`/chips/${chip.id}$`))
    await page.goto('/')
    // Labels not yet printed: the button opens the label page with those codes entered.
    const unlabelled = page.getByTestId('fab-unlabelled')
    if (Number(await unlabelled.getByTestId('count').textContent()) > 0) {
      await unlabelled.getByRole('link', { name: /^Print / }).click()
      await expect(page).toHaveURL(/\/labels\?codes=/)
      await page.goto('/')
    }
    await signOut(page)
  } finally {
    await fab.patch(`/api/chips/${chip.id}`, { data: { status: chip.status, reason: 'e2e: overview done' } })
    await fab.dispose()
  }

  await signIn(page, demo('optics').email)
  const optics = page.getByTestId('panel-optics')
  await expect(optics.getByRole('heading', { name: 'Optics staff' })).toBeVisible()
  await expect(page.getByTestId('panel-fab')).toHaveCount(0)
  // The signed-off setups (the demo lab has two), soonest expiry first, each with its expiry.
  const setups = page.getByTestId('optics-setups')
  expect(Number(await setups.getByTestId('count').textContent())).toBeGreaterThanOrEqual(2)
  await expect(setups.getByRole('link').first()).toContainText(/Sign-off expires \d{4}-\d{2}-\d{2} \(in \d+ days?\)/)
  await expect(page.getByTestId('optics-my-sessions')).toBeVisible()
  await expect(page.getByTestId('optics-never-measured')).toBeVisible()
  await expect(page.getByTestId('optics-flagged')).toBeVisible()
  await atBothSizes(page, 'optics')
})
