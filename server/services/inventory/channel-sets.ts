import { createHash } from 'node:crypto'
import { inArray } from 'drizzle-orm'
import { channelSets } from '../../db/schema/index'
import type { StoredChannel } from '../../../shared/records'
import { ENGINE_VERSION } from '../../../shared/engine'
import type { Db, DbOrTx } from '../../db/client'
import { BoundedCache } from '../../../shared/engine/bounded-cache'

/**
 * Content-addressed channel sets. An array stores only the key (SHA-256 of the channels' JSON):
 * a production wafer carries thousands of arrays of a few designs, and one set is ~20 kB with its
 * derivation text, so storing it per array made lists, exports and imports heavy. A stored set
 * never changes, which also makes it safe to keep parsed sets in a small in-process cache.
 */
export interface KeyedChannels {
  key: string
  channels: StoredChannel[]
}

export function keyChannels(channels: StoredChannel[]): KeyedChannels {
  return { key: createHash('sha256').update(JSON.stringify(channels)).digest('hex'), channels }
}

/** Store the sets not stored yet (one multi-row INSERT IGNORE per call; duplicates in `sets` are fine). */
export async function saveChannelSets(db: DbOrTx, sets: KeyedChannels[]): Promise<void> {
  const distinct = [...new Map(sets.map((s) => [s.key, s])).values()]
  for (let i = 0; i < distinct.length; i += 100) {
    await db
      .insert(channelSets)
      .ignore()
      .values(
        distinct.slice(i, i + 100).map((s) => ({ key: s.key, channels: s.channels, engineVersion: ENGINE_VERSION })),
      )
  }
  for (const s of distinct) cache.set(s.key, s.channels)
}

const cache = new BoundedCache<string, StoredChannel[]>(500)

/**
 * The sets of these keys (nulls skipped); unknown keys are simply absent from the answer.
 * `remember: false` for a one-off pass over every set (the export), which would otherwise fill the
 * cache with sets nobody asks for again (~45 kB each once parsed).
 */
export async function loadChannelSets(
  db: Pick<Db, 'select'>,
  keys: (string | null | undefined)[],
  { remember: keep = true } = {},
): Promise<Map<string, StoredChannel[]>> {
  const out = new Map<string, StoredChannel[]>()
  const missing: string[] = []
  for (const k of new Set(keys)) {
    if (!k) continue
    const hit = cache.get(k)
    if (hit) out.set(k, hit)
    else missing.push(k)
  }
  for (let i = 0; i < missing.length; i += 200) {
    const rows = await db
      .select({ key: channelSets.key, channels: channelSets.channels })
      .from(channelSets)
      .where(inArray(channelSets.key, missing.slice(i, i + 200)))
    for (const r of rows) {
      out.set(r.key, r.channels)
      if (keep) cache.set(r.key, r.channels)
    }
  }
  return out
}
