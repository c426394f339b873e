import { eq, inArray } from 'drizzle-orm'
import { mailQueue, users } from '../../../server/db/schema/index'
import type { Db } from '../../../server/db/client'
import { hashPassword } from '../../../server/auth/passwords'
import type { Role } from '../../../shared/roles'
import { uniqueEmail } from '../helpers'

/**
 * People made for the notice tests (never the demo people, whose preferences other tests and the
 * e2e journeys rely on). `retirePeople` deactivates them afterwards so later runs do not mail them.
 */
export const NOTICE_PASSWORD = 'a long test passphrase'

export async function makePerson(
  db: Db,
  roles: Role[],
  opts: { name?: string; notifyByMail?: boolean; active?: boolean; password?: boolean } = {},
) {
  const email = uniqueEmail(roles[0].replace('_', '-'))
  const name = opts.name ?? `Test ${roles[0]} ${Math.floor(Math.random() * 1e6)}`
  const [{ id }] = await db
    .insert(users)
    .values({
      email,
      name,
      roles,
      active: opts.active ?? true,
      notifyByMail: opts.notifyByMail ?? true,
      passwordHash: opts.password ? await hashPassword(NOTICE_PASSWORD) : null,
    })
    .$returningId()
  return { id, email, name }
}

export async function retirePeople(db: Db, ids: number[]): Promise<void> {
  if (ids.length) await db.update(users).set({ active: false }).where(inArray(users.id, ids))
}

/** Queued mail to one address, oldest first. */
export async function mailTo(db: Db, email: string) {
  return db.select().from(mailQueue).where(eq(mailQueue.toAddress, email)).orderBy(mailQueue.id)
}
