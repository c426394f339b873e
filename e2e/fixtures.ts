import { expect, type Page } from '@playwright/test'
import type { Role } from '../shared/roles'

/** The demo people the server seeds for the invented "Kestrel Nanophotonics Group". */
export interface DemoPerson {
  key: string
  email: string
  name: string
  roles: Role[]
  /** Role chip texts shown in the header (ROLE_LABELS). */
  roleLabels: string[]
  isAdminNavVisible: { people: boolean; mail: boolean }
}

export const DEMO_PASSWORD = 'overtone-demo'

export const DEMO_PEOPLE: DemoPerson[] = [
  {
    key: 'admin',
    email: 'admin@kestrel-lab.example',
    name: 'Ada Ferreira-Lund',
    roles: ['admin'],
    roleLabels: ['Administrator'],
    isAdminNavVisible: { people: true, mail: true },
  },
  {
    key: 'lead',
    email: 'lead@kestrel-lab.example',
    name: 'Maren Okafor',
    roles: ['group_lead'],
    roleLabels: ['Group lead'],
    isAdminNavVisible: { people: true, mail: false },
  },
  {
    key: 'fab',
    email: 'fab@kestrel-lab.example',
    name: 'Tomasz Lindqvist',
    roles: ['fab_technician'],
    roleLabels: ['Fab technician'],
    isAdminNavVisible: { people: false, mail: false },
  },
  {
    key: 'optics',
    email: 'optics@kestrel-lab.example',
    name: 'Priya Halvorsen',
    roles: ['optics_staff'],
    roleLabels: ['Optics staff'],
    isAdminNavVisible: { people: false, mail: false },
  },
  {
    key: 'safety',
    email: 'safety@kestrel-lab.example',
    name: 'Jonas Abara',
    roles: ['safety_officer'],
    roleLabels: ['Safety officer'],
    isAdminNavVisible: { people: false, mail: false },
  },
]

export const demo = (key: string): DemoPerson => {
  const person = DEMO_PEOPLE.find((p) => p.key === key)
  if (!person) throw new Error(`No demo person "${key}"; known: ${DEMO_PEOPLE.map((p) => p.key).join(', ')}`)
  return person
}

export const screen = (page: Page, name: string) =>
  page.screenshot({ path: `e2e/output/screens/${name}.png`, fullPage: true })

/** The area navigation in the left drawer. */
export const areaNav = (page: Page) => page.getByRole('navigation', { name: 'Areas' })

export async function signIn(page: Page, email: string, password = DEMO_PASSWORD): Promise<void> {
  await page.goto('/sign-in')
  await page.getByLabel('E-mail').fill(email)
  await page.getByLabel('Password').fill(password)
  await page.getByRole('button', { name: 'Sign in' }).click()
  await expect(page.getByRole('heading', { level: 1 })).toContainText(/Good (morning|afternoon|evening)/)
}

export async function signOut(page: Page): Promise<void> {
  await page.getByRole('link', { name: 'Sign out' }).click()
  await expect(page.getByRole('heading', { name: 'You are signed out' })).toBeVisible()
}

/**
 * The one-time link in the newest mail to `to`, read from the local SMTP sink's store: the
 * invitee's own mailbox. (The app's outbox shows such links masked.) Needs DATABASE_URL, which
 * `npm test` sets for the browser tests.
 */
export async function mailboxLink(to: string): Promise<string> {
  const { createConnection } = await import('mysql2/promise')
  const url = process.env.DATABASE_URL
  if (!url) throw new Error('DATABASE_URL is not set: run the browser tests through npm test')
  const conn = await createConnection(url)
  try {
    const [rows] = await conn.query(
      'SELECT text_body FROM mail_received WHERE to_address LIKE ? ORDER BY id DESC LIMIT 1',
      [`%${to}%`],
    )
    const text = (rows as { text_body: string }[])[0]?.text_body ?? ''
    const link = /https?:\/\/\S+\/invite\/[A-Za-z0-9_-]{20,}/.exec(text)?.[0]
    if (!link) throw new Error(`no one-time link in the mailbox of ${to}`)
    return link
  } finally {
    await conn.end()
  }
}
