import { sql } from 'drizzle-orm'
import type { Db } from '../client'
import { users } from '../schema/index'
import { hashPassword } from '../../auth/passwords'
import { DEMO_PASSWORD, DEMO_PEOPLE } from './people'
import { seedLab } from './lab'
import { seedSessions } from './sessions'

/** Seed the invented demo lab, only into an empty database. Returns false when data was already there. */
export async function seedDemo(db: Db): Promise<boolean> {
  const [{ n }] = await db.select({ n: sql<number>`count(*)` }).from(users)
  if (Number(n) > 0) return false
  const hash = await hashPassword(DEMO_PASSWORD)
  await db.transaction(async (tx) => {
    await tx.insert(users).values(DEMO_PEOPLE.map((p) => ({ ...p, passwordHash: hash })))
  })
  await seedLab(db)
  await seedSessions(db)
  return true
}
