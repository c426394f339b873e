import { createHash } from 'node:crypto'
import { sql } from 'drizzle-orm'
import type { ClientRateLimitInfo, Options, Store } from 'express-rate-limit'
import type { Db } from '../../db/client'

/**
 * An express-rate-limit store in MariaDB (table `throttle_hits`), so every app server behind a
 * proxy counts the same failed sign-ins. One upsert per hit: a row whose window has ended starts
 * again at 1. Keys are hashed (they hold an e-mail address). Times come from the database clock,
 * so app servers with skewed clocks still agree on the window.
 */
export class MariaDbThrottleStore implements Store {
  /** Counts live in MariaDB, not in this process. */
  localKeys = false
  private windowMs = 60_000
  private calls = 0

  constructor(
    private readonly db: Db,
    readonly prefix = 'login',
  ) {}

  init(options: Options): void {
    this.windowMs = options.windowMs
  }

  private keyOf(key: string): string {
    return `${this.prefix}:${createHash('sha256').update(key).digest('base64url')}`
  }

  private async read(k: string): Promise<ClientRateLimitInfo | undefined> {
    const [rows] = (await this.db.execute(
      sql`SELECT hits, reset_at AS resetAt FROM throttle_hits WHERE hit_key = ${k} AND reset_at > NOW(3)`,
    )) as unknown as [{ hits: number; resetAt: Date }[]]
    const row = rows[0]
    return row ? { totalHits: Number(row.hits), resetTime: new Date(row.resetAt) } : undefined
  }

  async get(key: string): Promise<ClientRateLimitInfo | undefined> {
    return this.read(this.keyOf(key))
  }

  async increment(key: string): Promise<ClientRateLimitInfo> {
    const k = this.keyOf(key),
      us = Math.round(this.windowMs * 1000)
    // ON DUPLICATE KEY UPDATE assigns left to right: `hits` is decided on the old reset_at, then reset_at.
    await this.db
      .execute(sql`INSERT INTO throttle_hits (hit_key, hits, reset_at) VALUES (${k}, 1, NOW(3) + INTERVAL ${us} MICROSECOND)
      ON DUPLICATE KEY UPDATE hits = IF(reset_at <= NOW(3), 1, hits + 1), reset_at = IF(reset_at <= NOW(3), NOW(3) + INTERVAL ${us} MICROSECOND, reset_at)`)
    if (++this.calls % 200 === 0) await this.sweep()
    return (await this.read(k)) ?? { totalHits: 1, resetTime: new Date(Date.now() + this.windowMs) }
  }

  async decrement(key: string): Promise<void> {
    await this.db.execute(
      sql`UPDATE throttle_hits SET hits = GREATEST(hits - 1, 0) WHERE hit_key = ${this.keyOf(key)} AND reset_at > NOW(3)`,
    )
  }

  async resetKey(key: string): Promise<void> {
    await this.db.execute(sql`DELETE FROM throttle_hits WHERE hit_key = ${this.keyOf(key)}`)
  }

  /** Remove rows whose window ended (bounded, so a sweep never holds locks for long). */
  async sweep(): Promise<void> {
    await this.db.execute(sql`DELETE FROM throttle_hits WHERE reset_at < NOW(3) LIMIT 1000`)
  }
}
