import { inArray, sql, type Column, type SQL } from 'drizzle-orm'
import type { Db } from '../../db/client'

/**
 * The search box of the big lists (arrays, chips, sessions) and of the global search, made of index
 * lookups instead of `LIKE '%…%'` scans (which cost ~100 ms per request on 100 000 arrays):
 * - codes by prefix, with the kind letter optional and nested codes understood: in the arrays
 *   list "0059-25", "C-0059-25" and "A-0059-25" all find the arrays of chip C-0059-25;
 * - notes by word prefix through a FULLTEXT index (migration 0009): "dose te" finds "dose test 4".
 *   Words shorter than the server's minimum token size and its stop words are left out (MariaDB
 *   would otherwise match nothing); when no word is left, notes are not searched.
 * Small tables (wafers, locations, materials, setups, people) keep their substring search.
 */

/**
 * Code prefixes to try for `q` in a table whose codes start with `letter-`. `nested` (lists): a
 * code of another kind maps onto this one (C-0059-25 → A-0059-25: the chip's arrays); without it
 * (global search) only the kind letter may be left out.
 */
export function codePrefixes(q: string, letter: 'A' | 'C' | 'W' | 'S' | 'L', nested = true): string[] {
  const t = q.trim().toUpperCase()
  if (!t) return []
  // Only a parent's code nests (W-0059 → its chips and arrays, C-0059-25 → its arrays): a session
  // or location code shares digits with array codes by chance, not by descent.
  if (/^[A-Z]-/.test(t))
    return t.startsWith(`${letter}-`) || !nested || !/^[WC]-/.test(t) ? [t] : [`${letter}-${t.slice(2)}`, t]
  if (/^\d/.test(t)) return [`${letter}-${t}`]
  return [t]
}

/** LIKE pattern of a code prefix (escaped). */
export const prefixPattern = (p: string) => `${p.replace(/[\\%_]/g, (c) => '\\' + c)}%`

interface FtSettings {
  minToken: number
  stop: Set<string>
}
let settings: Promise<FtSettings> | null = null

/** The server's full-text settings, read once (fallbacks are MariaDB's defaults). */
function ftSettings(db: Pick<Db, 'execute'>): Promise<FtSettings> {
  settings ??= (async () => {
    let minToken = 3
    let stop = new Set<string>()
    try {
      const [[row]] = (await db.execute(sql`SELECT @@innodb_ft_min_token_size AS n`)) as unknown as [[{ n: number }]]
      minToken = Number(row?.n ?? 3)
      const [words] = (await db.execute(
        sql`SELECT value FROM information_schema.INNODB_FT_DEFAULT_STOPWORD`,
      )) as unknown as [{ value: string }[]]
      stop = new Set(words.map((w) => String(w.value).toLowerCase()))
    } catch {
      /* keep the defaults */
    }
    return { minToken, stop }
  })()
  return settings
}

/** The words of `q` as a boolean-mode query (`+word* +word*`), or null when no word can be searched. */
export async function fulltextQuery(db: Pick<Db, 'execute'>, q: string): Promise<string | null> {
  const { minToken, stop } = await ftSettings(db)
  const words = q
    .toLowerCase()
    .split(/[^\p{L}\p{N}_]+/u)
    .filter((w) => w.length >= minToken && !stop.has(w))
  return words.length
    ? [...new Set(words)]
        .slice(0, 8)
        .map((w) => `+${w}*`)
        .join(' ')
    : null
}

/** More matching ids than this and the caller falls back to a plain (slower) condition. */
export const MAX_TEXT_HITS = 20_000

/** The search-box condition of a big list: the ids of `textHitIds`, or `fallback` when there are too many. */
export function idCondition(id: Column, ids: number[] | null, fallback: SQL | undefined): SQL | undefined {
  return ids === null ? fallback : inArray(id, ids)
}

/** `MATCH(columns) AGAINST (words IN BOOLEAN MODE)`; the columns must be exactly those of one FULLTEXT index. */
export function matchWords(columns: string[], words: string): SQL {
  return sql`MATCH(${sql.join(
    columns.map((c) => sql.identifier(c)),
    sql`, `,
  )}) AGAINST (${words} IN BOOLEAN MODE)`
}

/**
 * Where the search box of one big list looks: the table, its code letter, its FULLTEXT columns, and extra id queries.
 */
export interface TextTarget {
  table: string
  letter: 'A' | 'C' | 'S'
  wordColumns: string[]
  extra?: (text: string) => SQL[]
}

/**
 * Ids of the rows of `target.table` whose code starts with one of the code prefixes of `text`, whose
 * FULLTEXT columns have its words, or that an extra query finds: each branch an index lookup,
 * joined with UNION. Answers null when there are more than MAX_TEXT_HITS (the caller then
 * filters without the id list).
 */
export async function textHitIds(db: Pick<Db, 'execute'>, target: TextTarget, text: string): Promise<number[] | null> {
  const words = await fulltextQuery(db, text)
  const branches: SQL[] = codePrefixes(text, target.letter).map(
    (p) => sql`SELECT id FROM ${sql.identifier(target.table)} WHERE code LIKE ${prefixPattern(p)}`,
  )
  if (words)
    branches.push(sql`SELECT id FROM ${sql.identifier(target.table)} WHERE ${matchWords(target.wordColumns, words)}`)
  branches.push(...(target.extra?.(text) ?? []))
  if (!branches.length) return []
  const [rows] = (await db.execute(sql`${sql.join(branches, sql` UNION `)} LIMIT ${MAX_TEXT_HITS + 1}`)) as unknown as [
    { id: number }[],
  ]
  return rows.length > MAX_TEXT_HITS ? null : rows.map((r) => Number(r.id))
}
