import type { Db } from '../client'

/** Seed a few measurement sessions with files (runs after seedLab). */
export async function seedSessions(_db: Db): Promise<void> {}
