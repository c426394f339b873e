import { LRUCache } from 'lru-cache'
import type { User } from '../db/schema/index'

/**
 * Every API request reads its session row and its person row from MariaDB before any work. A page
 * of the client fires several requests within a second, and a list under load fires hundreds, so
 * each app server keeps what it read for a moment (SIGNED_IN_TTL_MS) instead of asking again.
 *
 * What this server changes itself it forgets at once (a sign-out, a new session, a person's roles,
 * active flag or password), so one server is never stale. Another app server behind the same proxy
 * may keep a signed-out session or an old role for at most SIGNED_IN_TTL_MS (see DEVELOPERS.md,
 * "Running several app servers").
 */
export const SIGNED_IN_TTL_MS = 2000

const people = new LRUCache<number, User>({ max: 5000, ttl: SIGNED_IN_TTL_MS })

/**
 * Write generations: a read that was on its way while this server wrote the same row (a sign-out,
 * a role change) must not put the old row back when it lands. Each write raises the key's number; a
 * read keeps its answer only if the number is the same as when it started.
 */
class Generations<K extends string | number> {
  private readonly n = new LRUCache<K, number>({ max: 50_000, ttl: 10 * 60_000 })
  of(key: K): number { return this.n.get(key) ?? 0 }
  raise(key: K): void { this.n.set(key, this.of(key) + 1) }
}
const userWrites = new Generations<number>()

/** The person `id`, from this server's memory if read in the last moment, else from `load`. */
export async function rememberedUser(id: number, load: (id: number) => Promise<User | undefined>): Promise<User | undefined> {
  const hit = people.get(id)
  if (hit) return hit
  const gen = userWrites.of(id)
  const u = await load(id)
  if (u && userWrites.of(id) === gen) people.set(id, u)
  return u
}

/** Drop the remembered row of a person whose row this server has just written. */
export function forgetUser(id: number): void {
  userWrites.raise(id)
  people.delete(id)
}

type Cb<T = unknown> = (err?: unknown, value?: T) => void
/** The callback face of an express-session store that these wrappers rely on. */
export interface CallbackStore {
  get: (sid: string, cb: Cb) => void
  set: (sid: string, data: unknown, cb?: Cb) => void
  destroy: (sid: string, cb?: Cb) => void
}

/**
 * Make `store.get` answer from memory for a moment after this server read or wrote the session.
 * Kept as JSON text and parsed on every hit: express-session and passport change the object they
 * are given, so a hit must never share it with an earlier request.
 */
export function rememberSessionReads(store: CallbackStore, ttlMs = SIGNED_IN_TTL_MS): void {
  const seen = new LRUCache<string, string>({ max: 20_000, ttl: ttlMs })
  const writes = new Generations<string>()
  const get = store.get.bind(store), set = store.set.bind(store), destroy = store.destroy.bind(store)
  store.get = (sid, cb) => {
    const hit = seen.get(sid)
    if (hit !== undefined) { cb(undefined, JSON.parse(hit)); return }
    const gen = writes.of(sid)
    get(sid, (err, data) => {
      if (!err && data && writes.of(sid) === gen) seen.set(sid, JSON.stringify(data))
      cb(err, data)
    })
  }
  store.set = (sid, data, cb) => {
    writes.raise(sid)
    seen.delete(sid)
    const gen = writes.of(sid)
    set(sid, data, (err) => {
      if (!err && writes.of(sid) === gen) seen.set(sid, JSON.stringify(data))
      cb?.(err)
    })
  }
  store.destroy = (sid, cb) => {
    writes.raise(sid)
    seen.delete(sid)
    destroy(sid, cb)
  }
}
