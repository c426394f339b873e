import { expect, test } from '@playwright/test'
import { areaNav, demo, mailboxLink, screen, signIn } from './fixtures'

test('admin invites a person, who accepts from the mailed one-time link', async ({ page }) => {
  const stamp = Date.now()
  const invitee = {
    name: `Ines Varga ${stamp}`,
    email: `ines.varga+${stamp}@kestrel-lab.example`,
    password: 'a quiet beam splitter',
  }

  await signIn(page, demo('admin').email)
  await areaNav(page)
    .getByRole('link', { name: /People/ })
    .click()
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
  await areaNav(page)
    .getByRole('link', { name: /Mail outbox/ })
    .click()
  const message = page.getByRole('link', { name: new RegExp(`To ${invitee.email.replace(/[+.]/g, '\\$&')}`) })
  await expect(async () => {
    await page.getByRole('button', { name: 'Refresh' }).click()
    await expect(message).toBeVisible({ timeout: 1_000 })
  }).toPass({ timeout: 20_000 })
  await screen(page, 'mail-outbox')
  await message.click()
  // The outbox never shows a usable one-time link: the token is masked to its last four characters.
  await expect(page.getByText(/\/invite\/••••[A-Za-z0-9_-]{4}/).first()).toBeVisible()
  await screen(page, 'mail-invite-message')
  const href = await mailboxLink(invitee.email)
  const token = href.split('/invite/')[1]
  await expect(page.getByText(token)).toHaveCount(0)
  expect(await page.content()).not.toContain(token)

  // The invitee opens the link from their own mailbox.
  await page.goto(new URL(href).pathname)
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
  await page.goto(new URL(href).pathname)
  await expect(page.getByRole('alert')).toContainText(/not valid|already been used/)
  await screen(page, 'invite-link-used')
})

test('a group lead is offered only the roles they may grant, and cannot change their own', async ({ page }) => {
  await signIn(page, demo('lead').email)
  await areaNav(page)
    .getByRole('link', { name: /People/ })
    .click()
  await page.getByRole('button', { name: 'Invite a person' }).click()
  const dialog = page.getByRole('dialog')
  await expect(dialog.getByRole('checkbox', { name: 'Optics staff' })).toBeVisible()
  await expect(dialog.getByRole('checkbox', { name: 'Administrator' })).toHaveCount(0)
  await expect(dialog.getByRole('checkbox', { name: 'Safety officer' })).toHaveCount(0)
  await screen(page, 'invite-dialog-group-lead')
  await dialog.getByRole('button', { name: 'Cancel' }).click()
  // the invite dialog must be gone before the Edit button can take a click (it fades out)
  await expect(dialog).toBeHidden()

  await page.getByRole('textbox', { name: 'Filter people' }).fill(demo('lead').email)
  const edit = page.getByRole('dialog')
  // The filtered list may still re-render under the first click (seen on a loaded CI machine): click
  // until the dialog is open.
  await expect(async () => {
    await page.getByRole('button', { name: `Edit ${demo('lead').name}` }).click()
    await expect(edit.getByText('You cannot change your own roles')).toBeVisible({ timeout: 3000 })
  }).toPass({ timeout: 30_000 })
  await expect(edit.getByRole('checkbox', { name: 'Group lead' })).toBeDisabled()
  await screen(page, 'edit-own-roles-group-lead')
})
