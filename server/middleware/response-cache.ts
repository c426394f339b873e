import type { RequestHandler } from 'express'
import { createHash } from 'node:crypto'
import { LRUCache } from 'lru-cache'
import type { AppContext } from '../context'
import { onBumpFailed, sharedVersionReader } from '../db/data-version'

/**
 * Response cache for read-heavy GET routes (the big lists, the global search, an array's page):
 * a JSON answer is kept per person and URL under the data version read BEFORE the route read its
 * data, and sent again while the version is unchanged. Any committed write through any app server
 * bumps the version (server/db/data-version.ts), so an answer is never older than the newest write
 * a request could know of. Each hit still asks MariaDB for the version (one primary-key row,
 * usually from its query cache; concurrent requests share a read sent after they arrived).
 *
 * `X-Response-Cache: hit | miss | bypass` says what happened. A request with `Cache-Control:
 * no-cache` (a hard reload, or the bench's uncached runs) or a URL over MAX_URL skips the cache.
 * Only 200 answers are kept. Per person, because what a person may read depends on their roles.
 */
/** The answer as sent (bytes) with its weak ETag (computed once, in the form Express gives its own). */
interface Entry { version: number; body: Buffer; etag: string }

const weakEtag = (body: Buffer) => `W/"${body.length.toString(16)}-${createHash('sha1').update(body).digest('base64').slice(0, 27)}"`

interface Cache { entries: LRUCache<string, Entry>; version: () => Promise<number | null> }
const caches = new WeakMap<AppContext, Cache | null>()

/** One cache and one version reader per app (a test's second app is a second server). */
function cacheOf(ctx: AppContext): Cache | null {
  if (!caches.has(ctx)) {
    const mb = ctx.env.RESPONSE_CACHE_MB
    // Sized by what an entry really holds (its key too: a URL can be long), and at most MAX_ENTRIES.
    const entries = mb > 0 ? new LRUCache<string, Entry>({
      max: MAX_ENTRIES, maxSize: mb * 1024 * 1024, sizeCalculation: (e, key) => e.body.length + e.etag.length + key.length * 2 + 160,
      ttl: ctx.env.RESPONSE_CACHE_TTL_MS,
    }) : null
    if (entries) {
      // Held weakly: an app that is gone (tests make many) must not be kept alive by the listener.
      const ref = new WeakRef(entries), log = ctx.log
      const stop = onBumpFailed((err) => {
        const live = ref.deref()
        if (!live) return stop()
        live.clear()
        log(`data version not bumped after a write (${(err as Error).message}); response cache emptied`)
      })
    }
    caches.set(ctx, entries ? { entries, version: sharedVersionReader(ctx.pool) } : null)
  }
  return caches.get(ctx)!
}

export const CACHE_HEADER = 'X-Response-Cache'
const MAX_ENTRIES = 50_000
/** Longer URLs are answered but not kept (no list or search needs one; junk parameters should not fill the cache). */
const MAX_URL = 2048

/** Put after the route's permission check: `r.get('/arrays', requireAbility(…), cachedJson(ctx), handler)`. */
export function cachedJson(ctx: AppContext): RequestHandler {
  return (req, res, next) => {
    const cache = cacheOf(ctx)
    if (!cache || req.originalUrl.length > MAX_URL || /no-cache|no-store/i.test(req.get('cache-control') ?? '')) { res.set(CACHE_HEADER, 'bypass'); return next() }
    const key = `${(req.user as { id?: number } | undefined)?.id ?? 0}|${req.originalUrl}`
    cache.version().then((version) => {
      if (res.headersSent) return // answered meanwhile (the database watchdog's 503)
      if (version === null) { res.set(CACHE_HEADER, 'bypass'); return next() }
      const hit = cache.entries.get(key)
      if (hit && hit.version === version) {
        res.set(CACHE_HEADER, 'hit').set('ETag', hit.etag).type('json').send(hit.body)
        return
      }
      res.set(CACHE_HEADER, 'miss')
      const json = res.json.bind(res)
      res.json = (body: unknown) => {
        if (res.statusCode !== 200) return json(body)
        // Its own memory (a small Buffer.from would be a slice of Node's shared 8 kB pool, kept whole).
        const text = JSON.stringify(body)
        const bytes = Buffer.allocUnsafeSlow(Buffer.byteLength(text))
        bytes.write(text)
        const etag = weakEtag(bytes)
        cache.entries.set(key, { version, body: bytes, etag })
        return res.set('ETag', etag).type('json').send(bytes)
      }
      next()
    }, next)
  }
}
