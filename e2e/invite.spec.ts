import { expect, test } from '@playwright/test'
import { areaNav, demo, screen, signIn } from './fixtures'

test('admin invites a person, who accepts from the mailed one-time link', async ({ page }) => {
  const stamp = Date.now()
  const invitee = { name: `Ines Varga ${stamp}`, email: `ines.varga+${stamp}@kestrel-lab.example`, password: 'a quiet beam splitter' }

  await signIn(page, demo('admin').email)
  await areaNav(page).getByRole('link', { name: /People/ }).click()
  await page.getByRole('button', { name: 'Invite a person' }).click()
  const dialog = page.getByRole('dialog')
  await dialog.getByLabel('Full name').fill(invitee.name)
  await dialog.getByLabel('E-mail').fill(invitee.email)
  await dialog.getByRole('checkbox', { name: 'Optics staff' }).click()
  await screen(page, 'invite-dialog')
  await dialog.getByRole('button', { name: 'Send invitation' }).click()
  await expect(dialog).toBeHidden()
  // The lab may have more people than one page shows: narrow the table to the invitee.
  await page.getByRole('textbox', { name: 'Filter people' }).fill(invitee.email)
  await expect(page.getByRole('row', { name: new RegExp(invitee.name) })).toContainText('Invitation pending')
  await screen(page, 'people-after-invite')

  // The mail goes through the queue to the local sink; poll the outbox until it has arrived.
  await areaNav(page).getByRole('link', { name: /Mail outbox/ }).click()
  const message = page.getByRole('link', { name: new RegExp(`To ${invitee.email.replace(/[+.]/g, '\\$&')}`) })
  await expect(async () => {
    await page.getByRole('button', { name: 'Refresh' }).click()
    await expect(message).toBeVisible({ timeout: 1_000 })
  }).toPass({ timeout: 20_000 })
  await screen(page, 'mail-outbox')
  await message.click()
  const inviteLink = page.getByRole('link', { name: /\/invite\// })
  await expect(inviteLink).toBeVisible()
  await screen(page, 'mail-invite-message')
  const href = await inviteLink.getAttribute('href')
  expect(href).toBeTruthy()

  await inviteLink.click()
  await expect(page.getByRole('heading', { name: 'Accept your invitation' })).toBeVisible()
  await expect(page.getByText(invitee.email, { exact: true })).toBeVisible()
  await page.getByLabel('New password').fill(invitee.password)
  await page.getByLabel('Repeat the password').fill(invitee.password)
  await screen(page, 'accept-invite')
  await page.getByRole('button', { name: 'Set password and sign in' }).click()

  const header = page.getByRole('banner')
  await expect(header.getByTestId('user-name')).toHaveText(invitee.name)
  await expect(header.getByText('Optics staff', { exact: true })).toBeVisible()
  await expect(areaNav(page).getByRole('link', { name: /People/ })).toHaveCount(0)
  await screen(page, 'home-invitee')

  // The link is single-use.
  await page.goto(new URL(href!).pathname)
  await expect(page.getByRole('alert')).toContainText(/not valid|already been used/)
  await screen(page, 'invite-link-used')
})
