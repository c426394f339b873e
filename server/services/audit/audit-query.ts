import { and, asc, desc, eq, inArray, like, or, sql, type SQL } from 'drizzle-orm'
import {
  auditLog,
  users,
  wafers,
  chips,
  arrays,
  locations,
  laserSetups,
  measurementSessions,
  materials,
  files,
  fabSteps,
  labelJobs,
} from '../../db/schema/index'
import type { MySqlColumn, MySqlTable } from 'drizzle-orm/mysql-core'
import type { Db } from '../../db/client'
import type { Page } from '../../../shared/records'
import type { AuditRow, AuditSearchQuery } from '../../../shared/audit'
import { fieldError, NotFoundError } from '../../errors'
import { likePattern } from '../inventory/codes'

/**
 * Reading the audit trail: one record's history, and the search for group leads. Rows are only
 * ever read here; nothing in the app updates or deletes them (and the database refuses to).
 */

/** Keys whose values never leave the server, wherever they sit in a change (hashes, tokens, secrets). */
const SENSITIVE = /pass(word)?|hash|token|secret|salt/i
/** Placeholders the services store instead of secrets, e.g. "(changed)". */
const PLACEHOLDER = /^\([^()]{0,40}\)$/

/** Replace anything sensitive (by key, at any depth) with "(hidden)"; placeholders stay readable. */
export function maskValue(value: unknown, sensitive = false): unknown {
  if (sensitive)
    return typeof value === 'string' && PLACEHOLDER.test(value) ? value : value == null ? value : '(hidden)'
  if (Array.isArray(value)) return value.map((v) => maskValue(v))
  if (value && typeof value === 'object') {
    return Object.fromEntries(Object.entries(value).map(([k, v]) => [k, maskValue(v, SENSITIVE.test(k))]))
  }
  return value
}

export function maskChanges(changes: AuditRow['changes']): AuditRow['changes'] {
  const out: AuditRow['changes'] = {}
  for (const [field, c] of Object.entries(changes ?? {})) {
    const s = SENSITIVE.test(field)
    out[field] = { from: maskValue(c?.from, s), to: maskValue(c?.to, s) }
  }
  return out
}

type Raw = { a: typeof auditLog.$inferSelect; userName: string | null }

const parseChanges = (v: unknown): AuditRow['changes'] =>
  typeof v === 'string' ? JSON.parse(v) : ((v as AuditRow['changes']) ?? {})

function toRow(r: Raw, code: string | null): AuditRow {
  const a = r.a
  return {
    id: a.id,
    at: a.at.toISOString(),
    user: a.userId ? { id: a.userId, name: r.userName ?? '?' } : null,
    entity: a.entity,
    entityId: a.entityId,
    code,
    action: a.action,
    changes: maskChanges(parseChanges(a.changes)),
    reason: a.reason,
  }
}

/** Code (or name) of each record, per kind, in one query per kind. */
const CODE_SOURCES: Record<string, { table: MySqlTable; id: MySqlColumn; code: MySqlColumn }> = {
  wafer: { table: wafers, id: wafers.id, code: wafers.code },
  chip: { table: chips, id: chips.id, code: chips.code },
  array: { table: arrays, id: arrays.id, code: arrays.code },
  location: { table: locations, id: locations.id, code: locations.code },
  laser_setup: { table: laserSetups, id: laserSetups.id, code: laserSetups.code },
  session: { table: measurementSessions, id: measurementSessions.id, code: measurementSessions.code },
  material: { table: materials, id: materials.id, code: materials.name },
  file: { table: files, id: files.id, code: files.originalName },
  user: { table: users, id: users.id, code: users.name },
}

async function codesOf(db: Db, rows: Raw[]): Promise<Map<string, string>> {
  const byKind = new Map<string, Set<number>>()
  for (const { a } of rows)
    if (CODE_SOURCES[a.entity]) (byKind.get(a.entity) ?? byKind.set(a.entity, new Set()).get(a.entity)!).add(a.entityId)
  const out = new Map<string, string>()
  await Promise.all(
    [...byKind].map(async ([kind, ids]) => {
      const s = CODE_SOURCES[kind]
      const found = (await db
        .select({ id: s.id, code: s.code })
        .from(s.table)
        .where(inArray(s.id, [...ids]))) as { id: number; code: string }[]
      for (const f of found) out.set(`${kind}:${f.id}`, f.code)
    }),
  )
  return out
}

/** A typed code (any case) or a material name → the record it names. */
export async function recordOfCode(db: Db, raw: string): Promise<{ entity: string; id: number } | undefined> {
  const code = raw.trim().toUpperCase()
  const prefixes: [string, string][] = [
    ['LS-', 'laser_setup'],
    ['W-', 'wafer'],
    ['C-', 'chip'],
    ['A-', 'array'],
    ['L-', 'location'],
    ['S-', 'session'],
  ]
  const kind = prefixes.find(([p]) => code.startsWith(p))?.[1]
  if (kind) {
    const s = CODE_SOURCES[kind]
    const [r] = (await db.select({ id: s.id }).from(s.table).where(eq(s.code, code))) as { id: number }[]
    return r && { entity: kind, id: r.id }
  }
  const [m] = await db.select({ id: materials.id }).from(materials).where(eq(materials.name, raw.trim()))
  return m && { entity: 'material', id: m.id }
}

const selectRows = (db: Db) =>
  db.select({ a: auditLog, userName: users.name }).from(auditLog).leftJoin(users, eq(users.id, auditLog.userId))

/** Table and id column of each kind of record, to tell "no history yet" from "no such record". */
const RECORD_TABLES: Record<string, { table: MySqlTable; id: MySqlColumn }> = {
  ...CODE_SOURCES,
  fab_step: { table: fabSteps, id: fabSteps.id },
  label_job: { table: labelJobs, id: labelJobs.id },
}

/** The whole history of one record, newest first; 404 when no such record exists (and it has no history). */
export async function recordHistory(db: Db, entity: string, entityId: number): Promise<AuditRow[]> {
  const rows = await selectRows(db)
    .where(and(eq(auditLog.entity, entity), eq(auditLog.entityId, entityId)))
    .orderBy(desc(auditLog.at), desc(auditLog.id))
  if (!rows.length) {
    const t = RECORD_TABLES[entity]
    const found = t ? await db.select({ id: t.id }).from(t.table).where(eq(t.id, entityId)).limit(1) : []
    if (!found.length) throw new NotFoundError('No such record')
  }
  const codes = await codesOf(db, rows.slice(0, 1))
  const code = codes.get(`${entity}:${entityId}`) ?? null
  return rows.map((r) => toRow(r, code))
}

/** A bare date `to` (YYYY-MM-DD) includes that whole UTC day. */
function dateRange(from?: string, to?: string): SQL[] {
  const out: SQL[] = []
  if (from) out.push(sql`${auditLog.at} >= ${new Date(from)}`)
  if (to) {
    const end = /^\d{4}-\d{2}-\d{2}$/.test(to) ? new Date(Date.parse(to) + 86_400_000) : new Date(to)
    out.push(/^\d{4}-\d{2}-\d{2}$/.test(to) ? sql`${auditLog.at} < ${end}` : sql`${auditLog.at} <= ${end}`)
  }
  return out
}

const SORTS: Record<AuditSearchQuery['sort'], SQL[]> = {
  at: [sql`${auditLog.at}`, sql`${auditLog.id}`],
  entity: [sql`${auditLog.entity}`, sql`${auditLog.entityId}`, sql`${auditLog.at}`, sql`${auditLog.id}`],
  action: [sql`${auditLog.action}`, sql`${auditLog.at}`, sql`${auditLog.id}`],
  user: [sql`${users.name}`, sql`${auditLog.at}`, sql`${auditLog.id}`],
}

/** Audit search: filters, sort and paging in SQL; a code that names no record is a 400 on `code`. */
export async function searchAudit(db: Db, q: AuditSearchQuery): Promise<Page<AuditRow>> {
  let byCode: { entity: string; id: number } | undefined
  if (q.code) {
    byCode = await recordOfCode(db, q.code)
    if (!byCode) throw fieldError('code', `No record has the code ${q.code.toUpperCase()}`)
    if (q.entity && q.entity !== byCode.entity)
      throw fieldError('code', `${q.code.toUpperCase()} is not a ${q.entity.replace('_', ' ')}`)
  }
  if (q.from && q.to && Date.parse(q.from) > Date.parse(q.to))
    throw fieldError('to', 'The end date is before the start date')
  const text = q.q ? likePattern(q.q) : undefined
  const where = and(
    q.userId ? eq(auditLog.userId, q.userId) : undefined,
    q.entity ? eq(auditLog.entity, q.entity) : undefined,
    q.entityId ? eq(auditLog.entityId, q.entityId) : undefined,
    byCode ? and(eq(auditLog.entity, byCode.entity), eq(auditLog.entityId, byCode.id)) : undefined,
    q.action ? eq(auditLog.action, q.action) : undefined,
    ...dateRange(q.from, q.to),
    text
      ? or(like(auditLog.reason, text), sql`JSON_SEARCH(JSON_KEYS(${auditLog.changes}), 'one', ${text}) IS NOT NULL`)
      : undefined,
  )
  const order = SORTS[q.sort].map((c) => (q.dir === 'desc' ? desc(c) : asc(c)))
  const [rows, [{ n }]] = await Promise.all([
    selectRows(db)
      .where(where)
      .orderBy(...order)
      .limit(q.pageSize)
      .offset((q.page - 1) * q.pageSize),
    db
      .select({ n: sql<number>`count(*)` })
      .from(auditLog)
      .where(where),
  ])
  const codes = await codesOf(db, rows)
  return {
    rows: rows.map((r) => toRow(r, codes.get(`${r.a.entity}:${r.a.entityId}`) ?? null)),
    total: Number(n),
    page: q.page,
    pageSize: q.pageSize,
  }
}
