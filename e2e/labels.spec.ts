import { test, expect, type APIResponse, type Page } from '@playwright/test'
import fs from 'node:fs'
import os from 'node:os'
import path from 'node:path'
import QRCode from 'qrcode'
import { demo, screen, signIn } from './fixtures'

/** Make a material and a wafer through the API (unique names); returns the wafer's code and id. */
async function makeWafer(page: Page): Promise<{ code: string; id: number }> {
  const tag = `${Date.now().toString(36)}${Math.floor(Math.random() * 1e4)}`
  const m = await page.request.post('/api/materials', {
    data: { name: `E2E label LN ${tag}`, formula: 'LiNbO3', pointGroup: '3m' },
  })
  expect(m.status(), await m.text()).toBe(201)
  const w = await page.request.post('/api/wafers', {
    data: {
      materialId: (await m.json()).id,
      cutNormal: [0, 0, 1],
      flatDirection: [1, 0, 0],
      diameterMm: 76.2,
      thicknessUm: 500,
      lot: `E2E-${tag}`,
    },
  })
  expect(w.status(), await w.text()).toBe(201)
  const wafer = await w.json()
  return { code: wafer.code, id: wafer.id }
}

test('fab technician previews, downloads and prints a label, then scans it back', async ({ page }) => {
  await signIn(page, demo('fab').email)
  const wafer = await makeWafer(page)

  await page.goto(`/labels?codes=${wafer.code}&template=wafer-carrier`)
  await expect(page.getByRole('heading', { name: 'Labels & scanning' })).toBeVisible()
  const preview = page.getByTestId('label-preview')
  await expect(preview.locator('svg[width="40mm"][height="20mm"]')).toBeVisible()
  await expect(preview.locator('text', { hasText: wafer.code })).toBeVisible()
  await screen(page, 'labels-preview')

  const [download] = await Promise.all([
    page.waitForEvent('download'),
    page.getByRole('link', { name: 'Download SVG' }).click(),
  ])
  expect(download.suggestedFilename()).toBe(`${wafer.code}-wafer-carrier.svg`)
  const svg = fs.readFileSync(await download.path(), 'utf8')
  expect(svg).toContain('width="40mm" height="20mm"')
  expect(svg).toContain(`>${wafer.code}</text>`)

  await page.getByRole('button', { name: 'Print' }).click()
  await expect(page).toHaveURL(/\/labels\/print\?/)
  await expect(page.getByTestId('print-pages').locator('svg[width="40mm"]')).toBeVisible()
  await screen(page, 'labels-print-view')
  await page.emulateMedia({ media: 'print' })
  await expect(page.locator('.q-header')).toBeHidden()
  await screen(page, 'labels-print-media')
  await page.emulateMedia({ media: 'screen' })
  const job = page.waitForResponse((r) => r.url().endsWith('/api/labels/jobs') && r.request().method() === 'POST')
  await page.evaluate(() => {
    window.print = () => {}
  })
  await page.getByTestId('print-now').click()
  expect((await job).status()).toBe(201)

  // A photo of the label's QR (same payload as the label) uploaded on the Scan page.
  const payload = `${new URL(page.url()).origin.toUpperCase()}/S/${wafer.code}`
  const png = path.join(os.tmpdir(), `label-${wafer.code}.png`)
  await QRCode.toFile(png, payload, { errorCorrectionLevel: 'M', scale: 8 })
  await page.getByTestId('header-scan').click()
  await expect(page.getByRole('heading', { name: 'Scan a label' })).toBeVisible()
  await page.locator('input[type=file]').setInputFiles(png)
  await expect(page.getByTestId('scan-result')).toContainText(wafer.code)
  await screen(page, 'scan-result')
  await page.getByTestId('scan-open').click()
  await expect(page).toHaveURL(new RegExp(`/wafers/${wafer.id}$`))
})

test('scan page explains a missing camera and a photo without a code', async ({ page }) => {
  await signIn(page, demo('optics').email)
  await page.goto('/scan')
  await page.getByTestId('camera-toggle').click()
  await expect(page.getByTestId('camera-message')).toBeVisible()
  const blank = path.join(os.tmpdir(), 'no-code.png')
  fs.writeFileSync(
    blank,
    Buffer.from(
      'iVBORw0KGgoAAAANSUhEUgAAAAEAAAABCAYAAAAfFcSJAAAADUlEQVR42mP8/5+hHgAHggJ/PchI7wAAAABJRU5ErkJggg==',
      'base64',
    ),
  )
  await page.locator('input[type=file]').setInputFiles(blank)
  await expect(page.getByTestId('scan-problem')).toContainText('No QR code was found')
  await page.setViewportSize({ width: 800, height: 1280 })
  await screen(page, 'scan-no-camera-tablet')
})

test('a keyboard-wedge burst anywhere opens the record; /S/<code> and /s/<code> resolve', async ({ page }) => {
  await signIn(page, demo('fab').email)
  const wafer = await makeWafer(page)
  await page.goto('/')
  // The listener comes with the signed-in layout: wait for it before scanning.
  await expect(page.getByRole('banner').getByTestId('user-name')).toBeVisible()
  // A scanner's burst: keys a few ms apart, then Enter. Dispatched in the page, because on a
  // loaded test machine page.keyboard.type({ delay: 5 }) was measured at 15–115 ms between keys
  // (each key is a CDP round trip), slower than any scanner and than the 40 ms burst limit.
  // Even setTimeout(5) stretched to ~40 ms there, so the keys go out back to back (a fast scanner).
  await page.evaluate((code) => {
    for (const key of [...code, 'Enter'])
      document.body.dispatchEvent(new KeyboardEvent('keydown', { key, bubbles: true, cancelable: true }))
  }, wafer.code)
  await expect(page).toHaveURL(new RegExp(`/wafers/${wafer.id}$`))

  // Slow typing is ignored.
  await page.goto('/')
  await page.keyboard.type(`${wafer.code}\n`, { delay: 120 })
  await page.waitForTimeout(300)
  await expect(page).toHaveURL(/\/$/)

  await page.goto(`/S/${wafer.code}`)
  await expect(page).toHaveURL(new RegExp(`/wafers/${wafer.id}$`))
  await page.goto(`/s/${wafer.code.toLowerCase()}`)
  await expect(page).toHaveURL(new RegExp(`/wafers/${wafer.id}$`))
  await page.goto('/S/W-NOPE9')
  await expect(page.getByRole('heading', { name: 'Unknown code' })).toBeVisible()
  await screen(page, 'scan-unknown-code')
})

test('scanning a location then a wafer offers "Move here"; an A4 sheet previews on a tablet', async ({ page }) => {
  await signIn(page, demo('fab').email)
  const wafer = await makeWafer(page)
  let parentId: number | null = null
  let boxCode = ''
  for (const kind of ['room', 'cabinet', 'box']) {
    const res: APIResponse = await page.request.post('/api/locations', {
      data: { kind, name: `E2E scan ${kind} ${Date.now().toString(36)}`, parentId },
    })
    expect(res.status(), await res.text()).toBe(201)
    ;({ id: parentId, code: boxCode } = await res.json())
  }

  await page.goto('/scan')
  for (const code of [boxCode, wafer.code]) {
    await page.getByTestId('scan-manual').fill(code.toLowerCase())
    await page.getByRole('button', { name: 'Look up' }).click()
    await expect(page.getByTestId('scan-result')).toContainText(code)
  }
  await page.getByTestId('scan-move').click()
  await page.getByRole('dialog').getByRole('button', { name: 'Move here' }).click()
  await expect(page.getByText(`Moved ${wafer.code} to`)).toBeVisible()
  await screen(page, 'scan-moved')

  await page.setViewportSize({ width: 800, height: 1280 })
  await page.goto(`/labels?codes=${wafer.code},${boxCode}&template=sheet-a4`)
  await expect(page.getByTestId('label-preview').locator('svg[width="210mm"][height="297mm"]')).toBeVisible()
  await screen(page, 'labels-sheet-tablet')
})
