import type { Db } from '../client'

/** Seed the demo lab's materials, locations, wafers, chips, arrays and laser setups. */
export async function seedLab(_db: Db): Promise<void> {}
