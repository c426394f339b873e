import type { RequestHandler } from 'express'
import type { Pool } from 'mysql2/promise'
import type { ApiErrorBody } from '../../shared/types'

/**
 * Requests never wait on a database that does not answer. A stopped or unreachable MariaDB makes
 * mysql2 fail at once (or after `connectTimeout`), and the error handler answers 503. A frozen one
 * (the process stopped, a network that drops packets) keeps its connections open and never
 * answers, so a query could wait for as long as the freeze lasts: here every API request that is
 * still running after CHECK_AFTER_MS asks a shared probe whether the database answers `SELECT 1`
 * within PROBE_TIMEOUT_MS, and answers 503 at once when it does not. A long request on a healthy
 * database (an import, an export) is not cut: the probe answers and the request goes on.
 *
 * The query a frozen database holds is not cancelled (mysql2 cannot); it finishes or fails when the
 * database is back, and whatever the route then tries to send is dropped (the answer was sent).
 * mysql2's pool drops broken connections and opens new ones, so the app reconnects by itself.
 */
export const CHECK_AFTER_MS = 2000
export const PROBE_TIMEOUT_MS = 1500

export const DB_UNAVAILABLE_MESSAGE =
  'The database is not answering right now, so this could not be done. Try again in a minute; if you were saving something, reload the page afterwards to see whether it was saved.'

export class DbMonitor {
  private inflight: Promise<boolean> | null = null
  private last = { at: 0, isUp: true }
  constructor(
    private readonly pool: Pool,
    private readonly timeoutMs = PROBE_TIMEOUT_MS,
  ) {}

  /** Does the database answer? One probe at a time; an answer younger than `maxAgeMs` is reused. */
  isUp(maxAgeMs = 500): Promise<boolean> {
    if (Date.now() - this.last.at < maxAgeMs) return Promise.resolve(this.last.isUp)
    this.inflight ??= this.probe().then((isUp) => {
      this.last = { at: Date.now(), isUp }
      this.inflight = null
      return isUp
    })
    return this.inflight
  }

  private async probe(): Promise<boolean> {
    let timer: NodeJS.Timeout | undefined
    const timeout = new Promise<false>((resolve) => {
      timer = setTimeout(() => resolve(false), this.timeoutMs)
    })
    try {
      // The failover pool's ping skips Galera's causal wait (server/db/failover-pool.ts).
      const ping =
        (this.pool as Pool & { ping?: () => Promise<void> }).ping?.bind(this.pool) ??
        (() => this.pool.query('SELECT 1'))
      return await Promise.race([
        ping().then(
          () => true,
          () => false,
        ),
        timeout,
      ])
    } finally {
      clearTimeout(timer)
    }
  }
}

const monitors = new WeakMap<Pool, DbMonitor>()
/** The one monitor of a pool (shared by the watchdog and /api/health). */
export function dbMonitorOf(pool: Pool): DbMonitor {
  let m = monitors.get(pool)
  if (!m) monitors.set(pool, (m = new DbMonitor(pool)))
  return m
}

/** Mount before the session store (which reads MariaDB on every signed-in request). */
export function dbWatchdog(pool: Pool, checkAfterMs = CHECK_AFTER_MS): RequestHandler {
  const monitor = dbMonitorOf(pool)
  return (req, res, next) => {
    // The session middleware (mounted after this) wraps res.end to save the session first, which
    // would wait on the frozen database too: the 503 is ended with the end from before it.
    const rawEnd = res.end.bind(res) as (chunk: string) => void
    let timer: NodeJS.Timeout | undefined
    const check = async () => {
      if (res.headersSent || res.writableEnded) return
      if (await monitor.isUp()) {
        timer = setTimeout(check, checkAfterMs)
        return
      }
      if (res.headersSent) return
      const body: ApiErrorBody = { error: 'unavailable', message: DB_UNAVAILABLE_MESSAGE, requestId: req.id }
      res.locals.isAnsweredByWatchdog = true
      res
        .status(503)
        .set({ 'Retry-After': '30', 'Content-Type': 'application/json; charset=utf-8', 'Cache-Control': 'no-store' })
      rawEnd(JSON.stringify(body))
    }
    timer = setTimeout(check, checkAfterMs)
    res.once('close', () => clearTimeout(timer))
    res.once('finish', () => clearTimeout(timer))
    next()
  }
}
