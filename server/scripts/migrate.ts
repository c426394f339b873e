import { createDb } from '../db/client'
import { applyMigrations } from '../db/migrate'

const url = process.env.DATABASE_URL
if (!url) {
  console.error('DATABASE_URL is not set')
  process.exit(2)
}
const { pool, db } = createDb(url, 2)
try {
  await applyMigrations(db)
  console.error('[overtone] migrations applied')
} catch (err) {
  console.error('[overtone] migration failed:', (err as Error).message)
  process.exitCode = 1
} finally {
  await pool.end()
}
