import fs from 'node:fs/promises'
import path from 'node:path'
import { and, asc, count, desc, eq, gte, inArray, isNull, notInArray, sql, type SQL } from 'drizzle-orm'
import { alias, type MySqlTable } from 'drizzle-orm/mysql-core'
import {
  arrays,
  auditLog,
  chips,
  fabSteps,
  files,
  invitations,
  laserSetups,
  locations,
  mailQueue,
  measurementSessions as ms,
  sessionResults,
  users,
  wafers,
  type User,
} from '../../db/schema/index'
import type { Db } from '../../db/client'
import { plainRows } from '../../db/plain-rows'
import { defineAbilityFor, type AppAbility } from '../../../shared/abilities'
import type { LaserSetup } from '../../../shared/records'
import {
  EXPIRING_DAYS,
  FLAG_SCAN_MAX,
  FLAG_WINDOW_DAYS,
  OVERVIEW_LIMIT,
  RECENT_DAYS,
  type AdminPanel,
  type FabPanel,
  type FlaggedSessionItem,
  type LeadPanel,
  type OpticsPanel,
  type Overview,
  type SafetyPanel,
  type SessionItem,
  type SetupItem,
  type UnlabelledItem,
} from '../../../shared/overview'
import { withSignoffs } from '../laser-safety/laser-setups'
import { addDays, todayUtc } from '../laser-safety/signoffs'
import { loadArrayContexts, rememberingCompare } from '../measurements/session-compare'
import { searchAudit } from '../audit/audit-query'

/**
 * The Overview: per role the signed-in person holds, the worklists of their day, each at most
 * OVERVIEW_LIMIT items with the full count. Read-only; every list is one or two indexed queries
 * (see DEVELOPERS.md, "The Overview"), and only the panels the person gets are computed.
 */

const LIMIT = OVERVIEW_LIMIT
const DAY_MS = 86400_000
const IN_USE = ['used_up', 'retired'] as const
const num = (v: unknown) => Number(v ?? 0)
const isoOf = (d: Date) => d.toISOString()

/** Which panels `user` gets: the role, and every ability its lists need. */
function panelsFor(user: Pick<User, 'id' | 'roles' | 'active'>, ability: AppAbility) {
  const has = (r: string) => (user.roles as string[]).includes(r)
  return {
    fab:
      has('fab_technician') &&
      ability.can('read', 'Chip') &&
      ability.can('create', 'FabStep') &&
      ability.can('create', 'Label'),
    optics:
      has('optics_staff') &&
      ability.can('create', 'Session') &&
      ability.can('read', 'Array') &&
      ability.can('read', 'LaserSetup'),
    safety: has('safety_officer') && ability.can('signoff', 'LaserSetup') && ability.can('read', 'Session'),
    lead: has('group_lead') && ability.can('read', 'Inventory') && ability.can('read', 'Audit'),
    admin: has('admin') && ability.can('manage', 'User') && ability.can('read', 'Mail'),
  }
}

export interface OverviewOptions {
  dataDir: string
  storageKind: 'local' | 's3'
}

export async function overviewFor(db: Db, user: User, opts: OverviewOptions): Promise<Overview> {
  const ability = defineAbilityFor(user)
  const want = panelsFor(user, ability)
  // The register is small (tens of setups): its sign-off states are computed once for both panels.
  const setups = want.optics || want.safety ? await setupStates(db) : []
  const [fab, optics, safety, lead, admin] = await Promise.all([
    want.fab ? fabPanel(db) : undefined,
    want.optics ? opticsPanel(db, user, setups) : undefined,
    want.safety ? safetyPanel(db, setups) : undefined,
    want.lead ? leadPanel(db, ability) : undefined,
    want.admin ? adminPanel(db, opts) : undefined,
  ])
  const panels: Overview['panels'] = {}
  if (fab) panels.fab = fab
  if (optics) panels.optics = optics
  if (safety) panels.safety = safety
  if (lead) panels.lead = lead
  if (admin) panels.admin = admin
  return { panels, generatedAt: new Date().toISOString() }
}

// ---------- fab technician ----------

/**
 * Codes that have been on a recorded print job (label_jobs.codes, written by "Print now"), as a
 * derived table MariaDB materialises once per statement (with a key on the code).
 */
const PRINTED_CODES = sql`SELECT jt.code FROM label_jobs lj, JSON_TABLE(lj.codes, '$[*]' COLUMNS (code VARCHAR(40) PATH '$')) jt WHERE jt.code IS NOT NULL`

async function fabPanel(db: Db): Promise<FabPanel> {
  const since = new Date(Date.now() - RECENT_DAYS * DAY_MS)
  const holders = alias(users, 'holders')
  const inProcessWhere = eq(chips.status, 'in_process')
  const stepsWhere = gte(fabSteps.performedAt, since)
  const unprintedChip = and(notInArray(chips.status, [...IN_USE]), sql`${chips.code} NOT IN (${PRINTED_CODES})`)
  const unprintedWafer = and(notInArray(wafers.status, [...IN_USE]), sql`${wafers.code} NOT IN (${PRINTED_CODES})`)
  const [inProcess, [inProcessN], steps, [stepsN], chipRows, [chipN], waferRows, [waferN]] = await Promise.all([
    // chips_status_idx, then a sort of the chips in process (a cleanroom's worth): the latest changed first
    db
      .select({
        id: chips.id,
        code: chips.code,
        waferCode: wafers.code,
        holder: holders.name,
        location: locations.code,
        updatedAt: chips.updatedAt,
      })
      .from(chips)
      .innerJoin(wafers, eq(wafers.id, chips.waferId))
      .leftJoin(holders, eq(holders.id, chips.holderId))
      .leftJoin(locations, eq(locations.id, chips.locationId))
      .where(inProcessWhere)
      .orderBy(desc(chips.updatedAt), desc(chips.id))
      .limit(LIMIT),
    db.select({ n: count() }).from(chips).where(inProcessWhere),
    // fab_steps_performed_idx, read backwards
    db
      .select({
        id: fabSteps.id,
        chipId: fabSteps.chipId,
        chipCode: chips.code,
        kind: fabSteps.kind,
        operator: users.name,
        performedAt: fabSteps.performedAt,
      })
      .from(fabSteps)
      .innerJoin(chips, eq(chips.id, fabSteps.chipId))
      .innerJoin(users, eq(users.id, fabSteps.operatorId))
      .where(stepsWhere)
      .orderBy(desc(fabSteps.performedAt), desc(fabSteps.id))
      .limit(LIMIT),
    db.select({ n: count() }).from(fabSteps).where(stepsWhere),
    db
      .select({ id: chips.id, code: chips.code, createdAt: chips.createdAt })
      .from(chips)
      .where(unprintedChip)
      .orderBy(desc(chips.id))
      .limit(LIMIT),
    db.select({ n: count() }).from(chips).where(unprintedChip),
    db
      .select({ id: wafers.id, code: wafers.code, createdAt: wafers.createdAt })
      .from(wafers)
      .where(unprintedWafer)
      .orderBy(desc(wafers.id))
      .limit(LIMIT),
    db.select({ n: count() }).from(wafers).where(unprintedWafer),
  ])
  const unlabelled: UnlabelledItem[] = [
    ...waferRows.map((r) => ({ kind: 'wafer' as const, id: r.id, code: r.code, createdAt: isoOf(r.createdAt) })),
    ...chipRows.map((r) => ({ kind: 'chip' as const, id: r.id, code: r.code, createdAt: isoOf(r.createdAt) })),
  ]
    .sort((a, b) => b.createdAt.localeCompare(a.createdAt) || a.code.localeCompare(b.code))
    .slice(0, LIMIT)
  return {
    inProcess: { items: inProcess.map((r) => ({ ...r, updatedAt: isoOf(r.updatedAt) })), total: num(inProcessN.n) },
    recentSteps: { items: steps.map((r) => ({ ...r, performedAt: isoOf(r.performedAt) })), total: num(stepsN.n) },
    unlabelled: { items: unlabelled, total: num(chipN.n) + num(waferN.n) },
  }
}

// ---------- sessions (optics, safety) ----------

const operators = alias(users, 'operators')
const SESSION_COLUMNS = {
  id: ms.id,
  code: ms.code,
  performedAt: ms.performedAt,
  operator: operators.name,
  setupId: laserSetups.id,
  setupCode: laserSetups.code,
  harmonicOrder: ms.harmonicOrder,
  wavelengthNm: ms.wavelengthNm,
  arrayCodes: sql<
    string[] | string | null
  >`(SELECT JSON_ARRAYAGG(a.code ORDER BY a.code) FROM session_results sr JOIN arrays a ON a.id = sr.array_id WHERE sr.session_id = ${ms.id})`,
}
const jsonList = (v: string[] | string | null): string[] =>
  typeof v === 'string' ? (JSON.parse(v) as string[]) : (v ?? [])

/** Sessions matching `where`, newest first (sessions_performed_idx backwards), with the full count. */
async function sessionList(
  db: Db,
  where: SQL | undefined,
  limit: number,
): Promise<{ items: (SessionItem & { setupId: number })[]; total: number }> {
  const [rows, [{ n }]] = await Promise.all([
    plainRows(db, SESSION_COLUMNS, (f) =>
      db
        .select(f)
        .from(ms)
        .innerJoin(laserSetups, eq(laserSetups.id, ms.laserSetupId))
        .innerJoin(operators, eq(operators.id, ms.operatorId))
        .where(where)
        .orderBy(desc(ms.performedAt), desc(ms.id))
        .limit(limit),
    ),
    db.select({ n: count() }).from(ms).where(where),
  ])
  return {
    items: rows.map((r) => ({ ...r, performedAt: isoOf(r.performedAt), arrayCodes: jsonList(r.arrayCodes) })),
    total: num(n),
  }
}

/**
 * Sessions of the last FLAG_WINDOW_DAYS days (at most FLAG_SCAN_MAX, newest first) whose observed
 * channels contradict the engine, with the same comparison as the session page (predictions are
 * remembered per design for the pass).
 */
async function flaggedSessions(db: Db): Promise<OpticsPanel['flagged']> {
  const since = new Date(Date.now() - FLAG_WINDOW_DAYS * DAY_MS)
  const { items: recent } = await sessionList(db, gte(ms.performedAt, since), FLAG_SCAN_MAX)
  if (!recent.length) return { items: [], total: 0, scanned: 0, isCapped: false }
  const pumps = await db
    .select({ id: ms.id, pump: ms.pump })
    .from(ms)
    .where(
      inArray(
        ms.id,
        recent.map((s) => s.id),
      ),
    )
  const pumpOf = new Map(pumps.map((p) => [p.id, typeof p.pump === 'string' ? JSON.parse(p.pump) : p.pump]))
  const results = await db
    .select({
      sessionId: sessionResults.sessionId,
      arrayId: sessionResults.arrayId,
      observedNormal: sessionResults.observedNormal,
      observedM: sessionResults.observedM,
    })
    .from(sessionResults)
    .where(
      inArray(
        sessionResults.sessionId,
        recent.map((s) => s.id),
      ),
    )
  const contexts = await loadArrayContexts(db, [...new Set(results.map((r) => r.arrayId))])
  const compare = rememberingCompare()
  const flagsOf = new Map<number, string[]>()
  const orderOf = new Map(recent.map((s) => [s.id, s.harmonicOrder]))
  for (const r of results) {
    const ctx = contexts.get(r.arrayId)
    if (!ctx) continue
    const observedM = typeof r.observedM === 'string' ? (JSON.parse(r.observedM) as number[]) : r.observedM
    const { flags } = compare(
      ctx,
      { observedNormal: r.observedNormal, observedM },
      pumpOf.get(r.sessionId),
      orderOf.get(r.sessionId)!,
    )
    if (flags.length) flagsOf.set(r.sessionId, [...(flagsOf.get(r.sessionId) ?? []), ...flags])
  }
  const flagged: FlaggedSessionItem[] = recent
    .filter((s) => flagsOf.has(s.id))
    .map(({ setupId: _s, ...s }) => ({ ...s, flagCount: flagsOf.get(s.id)!.length, firstFlag: flagsOf.get(s.id)![0] }))
  return {
    items: flagged.slice(0, LIMIT),
    total: flagged.length,
    scanned: recent.length,
    isCapped: recent.length >= FLAG_SCAN_MAX,
  }
}

// ---------- laser setups (optics, safety) ----------

async function setupStates(db: Db): Promise<LaserSetup[]> {
  return withSignoffs(
    db,
    await db.select().from(laserSetups).where(isNull(laserSetups.retiredAt)).orderBy(asc(laserSetups.code)),
  )
}

function setupItem(s: LaserSetup, today: string): SetupItem {
  const expiresOn = s.signoff.expiresOn
  return {
    id: s.id,
    code: s.code,
    name: s.name,
    state: s.signoff.state,
    expiresOn,
    submittedAt: s.submittedAt,
    daysLeft: expiresOn ? Math.round((Date.parse(expiresOn) - Date.parse(today)) / DAY_MS) : null,
  }
}

const listOf = <T>(all: T[]) => ({ items: all.slice(0, LIMIT), total: all.length })
const byExpiry = (a: SetupItem, b: SetupItem) =>
  (a.expiresOn ?? '').localeCompare(b.expiresOn ?? '') || a.code.localeCompare(b.code)

async function opticsPanel(db: Db, user: User, setups: LaserSetup[]): Promise<OpticsPanel> {
  const today = todayUtc()
  const neverWhere = and(
    isNull(arrays.retiredAt),
    sql`NOT EXISTS (SELECT 1 FROM session_results sr WHERE sr.array_id = ${arrays.id})`,
  )
  const [mine, flagged, never, [neverN]] = await Promise.all([
    sessionList(db, eq(ms.operatorId, user.id), LIMIT),
    flaggedSessions(db),
    db
      .select({
        id: arrays.id,
        code: arrays.code,
        chipCode: chips.code,
        shape: arrays.shape,
        createdAt: arrays.createdAt,
      })
      .from(arrays)
      .innerJoin(chips, eq(chips.id, arrays.chipId))
      .where(neverWhere)
      .orderBy(desc(arrays.id))
      .limit(LIMIT),
    // the count reads every array in use with an index probe into session_results: cached by MariaDB until either table
    // changes
    plainRows(db, { n: count() }, (f) => db.select(f).from(arrays).where(neverWhere), { cache: true }),
  ])
  return {
    mySessions: { items: mine.items.map(({ setupId: _s, ...s }) => s), total: mine.total },
    flagged,
    neverMeasured: { items: never.map((r) => ({ ...r, createdAt: isoOf(r.createdAt) })), total: num(neverN.n) },
    usableSetups: listOf(
      setups
        .filter((s) => s.signoff.isValid)
        .map((s) => setupItem(s, today))
        .sort(byExpiry),
    ),
  }
}

async function safetyPanel(db: Db, setups: LaserSetup[]): Promise<SafetyPanel> {
  const today = todayUtc()
  const soon = addDays(today, EXPIRING_DAYS)
  const items = setups.map((s) => setupItem(s, today))
  const state = (s: SetupItem) => s.state
  // As the sign-off queue: submitted setups never or no longer approved, approvals running out, expired ones.
  const waiting = items
    .filter((s) => (state(s) === 'waiting' || state(s) === 'voided') && s.submittedAt !== null)
    .sort((a, b) => (a.submittedAt ?? '').localeCompare(b.submittedAt ?? ''))
  const expiring = items.filter((s) => state(s) === 'approved' && s.expiresOn! <= soon).sort(byExpiry)
  const expired = items.filter((s) => state(s) === 'expired').sort(byExpiry)
  // Every session was logged on a setup signed off at the time; these setups no longer are.
  const lapsed = new Map(items.filter((s) => s.state !== 'approved').map((s) => [s.id, s]))
  const sessions = lapsed.size
    ? await sessionList(db, inArray(ms.laserSetupId, [...lapsed.keys()]), LIMIT)
    : { items: [], total: 0 }
  return {
    waiting: listOf(waiting),
    expiring: listOf(expiring),
    expired: listOf(expired),
    lapsedSessions: {
      items: sessions.items.map((s) => ({
        ...s,
        setupState: lapsed.get(s.setupId)!.state,
        setupExpiresOn: lapsed.get(s.setupId)!.expiresOn,
      })),
      total: sessions.total,
    },
  }
}

// ---------- group lead ----------

async function leadPanel(db: Db, ability: AppAbility): Promise<LeadPanel> {
  const sinceDate = new Date(Date.now() - RECENT_DAYS * DAY_MS)
  const n = async <T extends { n: number }>(q: Promise<T[]>) => num((await q)[0].n)
  const counted = (table: MySqlTable, where?: SQL) =>
    n(plainRows(db, { n: count() }, (f) => db.select(f).from(table).where(where), { cache: true }))
  const [waferN, chipN, inProcessN, arrayN, sessionN, locationN, setupN, audit, byAction] = await Promise.all([
    counted(wafers, notInArray(wafers.status, [...IN_USE])),
    counted(chips, notInArray(chips.status, [...IN_USE])),
    counted(chips, eq(chips.status, 'in_process')),
    counted(arrays, isNull(arrays.retiredAt)),
    counted(ms),
    counted(locations, isNull(locations.retiredAt)),
    counted(laserSetups, isNull(laserSetups.retiredAt)),
    searchAudit(db, {
      from: sinceDate.toISOString(),
      sort: 'at',
      dir: 'desc',
      page: 1,
      pageSize: LIMIT,
      code: undefined,
      q: undefined,
    }),
    db
      .select({ action: auditLog.action, n: count() })
      .from(auditLog)
      .where(gte(auditLog.at, sinceDate))
      .groupBy(auditLog.action),
  ])
  return {
    counts: {
      wafers: waferN,
      chips: chipN,
      chipsInProcess: inProcessN,
      arrays: arrayN,
      sessions: sessionN,
      locations: locationN,
      laserSetups: setupN,
    },
    activity: {
      items: audit.rows.map((r) => ({
        id: r.id,
        at: r.at,
        user: r.user?.name ?? null,
        action: r.action,
        entity: r.entity,
        entityId: r.entityId,
        code: r.code,
        reason: r.reason,
      })),
      total: audit.total,
      from: sinceDate.toISOString(),
      byAction: Object.fromEntries(byAction.map((r) => [r.action, num(r.n)])),
    },
    canExport: ability.can('export', 'Inventory'),
  }
}

// ---------- administrator ----------

async function freeBytes(dir: string): Promise<number | null> {
  for (const d of [dir, path.dirname(dir)]) {
    try {
      const s = await fs.statfs(d)
      return s.bavail * s.bsize
    } catch {
      /* not there yet: ask its parent */
    }
  }
  return null
}

async function adminPanel(db: Db, opts: OverviewOptions): Promise<AdminPanel> {
  const now = new Date()
  // Each person's latest invitation, while they have not accepted it (no password yet).
  const latest = sql`${invitations.id} = (SELECT MAX(i2.id) FROM invitations i2 WHERE i2.user_id = ${invitations.userId})`
  const open = and(isNull(invitations.usedAt), isNull(users.passwordHash), eq(users.active, true), latest)
  const undeliveredWhere = inArray(mailQueue.status, ['queued', 'failed'])
  const [pending, expired, mail, [mailN], [failedN], [blobs], free] = await Promise.all([
    db
      .select({
        userId: users.id,
        name: users.name,
        email: users.email,
        invitedAt: invitations.createdAt,
        expiresAt: invitations.expiresAt,
      })
      .from(invitations)
      .innerJoin(users, eq(users.id, invitations.userId))
      .where(and(open, gte(invitations.expiresAt, now)))
      .orderBy(desc(invitations.id)),
    db
      .select({ n: count() })
      .from(invitations)
      .innerJoin(users, eq(users.id, invitations.userId))
      .where(and(open, sql`${invitations.expiresAt} < ${now}`)),
    db
      .select({
        id: mailQueue.id,
        to: mailQueue.toAddress,
        subject: mailQueue.subject,
        status: mailQueue.status,
        attempts: mailQueue.attempts,
        lastError: mailQueue.lastError,
        createdAt: mailQueue.createdAt,
      })
      .from(mailQueue)
      .where(undeliveredWhere)
      .orderBy(desc(mailQueue.id))
      .limit(LIMIT),
    db.select({ n: count() }).from(mailQueue).where(undeliveredWhere),
    db.select({ n: count() }).from(mailQueue).where(eq(mailQueue.status, 'failed')),
    // Blobs are stored once per content (and kept for retired files): distinct hashes and their sizes.
    db
      .select({ n: count(), bytes: sql<string>`COALESCE(SUM(b.size), 0)` })
      .from(
        sql`(SELECT ${files.sha256} AS sha, MAX(${files.sizeBytes}) AS size FROM ${files} GROUP BY ${files.sha256}) b`,
      ),
    opts.storageKind === 'local' ? freeBytes(path.join(opts.dataDir, 'uploads')) : Promise.resolve(null),
  ])
  return {
    invitations: {
      items: pending
        .slice(0, LIMIT)
        .map((r) => ({ ...r, invitedAt: isoOf(r.invitedAt), expiresAt: isoOf(r.expiresAt) })),
      total: pending.length,
      expired: num(expired[0].n),
    },
    undelivered: {
      items: mail.map((m) => ({ ...m, status: m.status as 'queued' | 'failed', createdAt: isoOf(m.createdAt) })),
      total: num(mailN.n),
      failed: num(failedN.n),
    },
    storage: { kind: opts.storageKind, files: num(blobs.n), bytes: num(blobs.bytes), freeBytes: free },
  }
}
