import { createDb } from '../db/client'
import { seedDemo } from '../db/seed/index'
import { DEMO_PASSWORD, DEMO_PEOPLE } from '../db/seed/people'

const url = process.env.DATABASE_URL
if (!url) {
  console.error('DATABASE_URL is not set')
  process.exit(2)
}
const { pool, db } = createDb(url, 2)
try {
  const seeded = await seedDemo(db)
  console.error(seeded ? '[overtone] demo lab seeded' : '[overtone] database already has data; demo seed skipped')
  if (process.argv.includes('--print')) {
    console.log('\nDemo sign-ins (password for all: ' + DEMO_PASSWORD + '):')
    for (const p of DEMO_PEOPLE) console.log(`  ${p.email.padEnd(30)} ${p.name} (${p.roles.join(', ')})`)
  }
} catch (err) {
  console.error('[overtone] seeding failed:', (err as Error).message)
  process.exitCode = 1
} finally {
  await pool.end()
}
