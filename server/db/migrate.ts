import path from 'node:path'
import { migrate } from 'drizzle-orm/mysql2/migrator'
import type { Db } from './client'

/** Apply the committed SQL migrations in drizzle/ (idempotent; tracked in __drizzle_migrations). */
export async function applyMigrations(db: Db, root = process.cwd()): Promise<void> {
  await migrate(db, { migrationsFolder: path.join(root, 'drizzle') })
}
