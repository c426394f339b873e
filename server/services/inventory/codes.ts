import { sql, type SQL } from 'drizzle-orm'
import type { Db, DbOrTx } from '../../db/client'
import { NotFoundError, fieldError } from '../../errors'

/**
 * Short human codes of the sample records: wafers W-0001, chips C-0001-01 (wafer number + chip
 * index), arrays A-0001-01-B2 (chip numbers + position), locations L-0001. Codes are uppercase,
 * immutable, and never reused (retired rows keep theirs, and the next number is max + 1).
 */
export const pad = (n: number, width: number) => String(n).padStart(width, '0')

export const waferCode = (n: number) => `W-${pad(n, 4)}`
export const chipCode = (waferNumber: number, index: number) => `C-${pad(waferNumber, 4)}-${pad(index, 2)}`
export const arrayCode = (chipCodeValue: string, position: string) =>
  `A-${chipCodeValue.slice(2)}-${position.toUpperCase()}`
export const locationCode = (n: number) => `L-${pad(n, 4)}`

/** The highest chip index a code can carry (two digits). */
export const MAX_CHIP_INDEX = 99

/** Number part of a `X-0042…` code. */
export function codeNumber(code: string): number {
  return Number(code.split('-')[1])
}

/**
 * Next number for `prefix` codes in `table`, inside the caller's transaction: the series row of
 * `code_series` is moved on (locked until the caller commits, a short write), never the range of
 * codes in the table, so a running Excel import that has reserved its numbers blocks nobody. The
 * highest code already in the table (a plain, non-locking read) is taken into account, so rows
 * written outside the app cannot be handed out twice; the unique index on `code` is the last line
 * of defence.
 */
export async function nextCodeNumber(tx: DbOrTx, table: 'wafers' | 'locations', prefix: string): Promise<number> {
  return takeCodeNumbers(tx, table, prefix, 1)
}

/** Take `count` consecutive numbers of the series in the caller's transaction; answers the first. */
async function takeCodeNumbers(
  tx: DbOrTx,
  table: 'wafers' | 'locations',
  prefix: string,
  count: number,
): Promise<number> {
  const [maxRows] = (await tx.execute(
    sql`SELECT COALESCE(MAX(CAST(SUBSTRING(code, ${prefix.length + 2}) AS UNSIGNED)), 0) AS n FROM ${sql.raw(table)} WHERE code LIKE ${prefix + '-%'}`,
  )) as unknown as [{ n: number | string }[]]
  const max = Number(maxRows[0]?.n ?? 0)
  await tx.execute(sql`INSERT INTO code_series (series, last_number) VALUES (${prefix}, ${max + count})
    ON DUPLICATE KEY UPDATE last_number = GREATEST(last_number, ${max}) + ${count}`)
  const [rows] = (await tx.execute(
    sql`SELECT last_number AS n FROM code_series WHERE series = ${prefix}`,
  )) as unknown as [{ n: number | string }[]]
  return Number(rows[0].n) - count + 1
}

/**
 * Reserve `count` numbers of a series in a transaction of their own that commits at once (an
 * import, before its long insert transaction). Numbers of an import that then fails stay unused:
 * codes are never reused, gaps are allowed.
 */
export async function reserveCodeNumbers(
  db: Db,
  table: 'wafers' | 'locations',
  prefix: string,
  count: number,
): Promise<number> {
  if (count <= 0) return 0
  return db.transaction((tx) => takeCodeNumbers(tx, table, prefix, count))
}

/** The number the next creation would get now (a preview; nothing is reserved or locked). */
export async function peekCodeNumber(db: DbOrTx, table: 'wafers' | 'locations', prefix: string): Promise<number> {
  const [rows] =
    (await db.execute(sql`SELECT GREATEST(COALESCE((SELECT MAX(CAST(SUBSTRING(code, ${prefix.length + 2}) AS UNSIGNED)) FROM ${sql.raw(table)} WHERE code LIKE ${prefix + '-%'}), 0),
    COALESCE((SELECT last_number FROM code_series WHERE series = ${prefix}), 0)) AS n`)) as unknown as [
      { n: number | string }[],
    ]
  return Number(rows[0].n) + 1
}

/** Escape a user's text for LIKE. */
export function likePattern(q: string, prefixOnly = false): string {
  const esc = q.replace(/[\\%_]/g, (c) => '\\' + c)
  return prefixOnly ? `${esc}%` : `%${esc}%`
}

/** Throw 404 unless the row exists. */
export function found<T>(row: T | undefined, what: string): T {
  if (!row) throw new NotFoundError(`No such ${what}.`)
  return row
}

/** A retire reason is mandatory (400 on `reason`). */
export function requireReason(reason: string | null | undefined, what: string): string {
  if (!reason || !reason.trim()) throw fieldError('reason', `Say why the ${what} is retired (kept in the audit trail)`)
  return reason.trim()
}

/** ORDER BY for a whitelisted sort column. */
export function orderBy(
  columns: Record<string, SQL | unknown>,
  sort: string | undefined,
  dir: 'asc' | 'desc',
  fallback: string,
): SQL {
  const col = (sort && sort in columns ? columns[sort] : columns[fallback]) as SQL
  return dir === 'desc' ? sql`${col} desc` : sql`${col} asc`
}

export const iso = (d: Date | null | undefined) => (d ? d.toISOString() : null)
