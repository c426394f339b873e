import { asc, eq, getTableColumns, gt, inArray, sql } from 'drizzle-orm'
import { alias } from 'drizzle-orm/mysql-core'
import type ExcelJS from 'exceljs'
import {
  arrays,
  chips,
  fabSteps,
  files,
  laserSetups,
  locations,
  materials,
  measurementSessions as ms,
  moves,
  sessionResults,
  users,
  wafers,
} from '../../db/schema/index'
import type { Db } from '../../db/client'
import type { StoredChannel } from '../../../shared/records'
import type { PumpSpec } from '../../../shared/engine'
import { staleChannelsSql } from '../inventory/stale-channels'
import {
  ARRAY_COLUMNS,
  CHIP_COLUMNS,
  WAFER_COLUMNS,
  dimensionColumn,
  dimensionsOf,
  FORM_DIMENSIONS,
} from './excel-columns'
import {
  DATE_FMT,
  DATE_TIME_FMT,
  addSafeRow,
  addStyledSheet,
  dateOnly,
  vectorText,
  type SheetColumn,
} from './excel-style'
import { STANDARD_PUMPS, STORED_ORDERS } from '../inventory/array-channels'
import { loadChannelSets } from '../inventory/channel-sets'
import { cutLabel } from '../inventory/cut-label'
import { locationRefs } from '../inventory/locations'
import { loadArrayContexts, rememberingCompare } from '../measurements/session-compare'
import { withSignoffs } from '../laser-safety/laser-setups'
import { describeFabParams } from '../../../shared/fab-params'

/**
 * The sheets of the inventory export. Each reads its table in keyset-paged batches (BATCH rows by
 * id) and commits every row as it goes, so 100 000 arrays never sit in memory at once. 500 rather
 * than 2000: a batch is alive while it is written, and a large one outlives enough young-generation
 * collections to be promoted, which raised the export's peak RSS by ~20 MB for no gain in time.
 */
export const BATCH = 500
type Book = Pick<ExcelJS.Workbook, 'addWorksheet'>
export interface SheetContext {
  db: Db
  book: Book
  tick: (rows: number) => void
}

/** Copy the importable columns' headers (so an export can be imported again), then the export-only ones. */
const importable = (cols: typeof WAFER_COLUMNS): SheetColumn[] =>
  cols
    .filter((c) => !c.isLegacy)
    .map((c) => ({ header: c.header, key: c.key, width: c.width, numFmt: c.kind === 'date' ? DATE_FMT : undefined }))
/** The record's version as the Version column shows it (the importer compares it with the record's). */
const versionOf = (updatedAt: Date) => updatedAt.toISOString()
const utc = (header: string, key: string): SheetColumn => ({
  header: `${header} (UTC)`,
  key,
  width: 17,
  numFmt: DATE_TIME_FMT,
})

/**
 * Keyset paging: call `page(afterId)` until it answers no rows; each batch goes to `write`. The next
 * batch is read while this one is written, and before going on we wait until the zip compressor has
 * taken most of the sheet's XML (see `drained`), so memory stays flat however fast rows are made.
 */
async function eachBatch<T>(
  ws: ExcelJS.Worksheet,
  page: (afterId: number) => Promise<T[]>,
  idOf: (row: T) => number,
  write: (rows: T[]) => Promise<void> | void,
) {
  let next = page(0)
  for (;;) {
    const rows = await next
    if (!rows.length) return
    next = page(idOf(rows[rows.length - 1]))
    next.catch(() => {}) // a failure is thrown by the `await next` above; not unhandled if `write` throws first
    await write(rows)
    await drained(ws)
  }
}

/**
 * exceljs hands a sheet's XML to the zip without back-pressure: rows are made faster than they are
 * deflated, and the difference piled up in memory (~250 MB for 100 000 arrays). Wait while more
 * than BACKLOG bytes of the sheet are not yet taken by the compressor; fail the export if it takes
 * nothing for STALL_MS (a broken zip or file stream would otherwise leave the job hanging). Reads
 * the writer's own stream (exceljs internals); if that is not there, nothing is waited for.
 */
const BACKLOG = 4 * 1024 * 1024
const STALL_MS = 60_000
interface Buffered {
  length?: number
}
interface SheetPipe {
  writableLength?: number
  readableLength?: number
  _writableState?: Buffered
  _readableState?: Buffered
}
async function drained(ws: ExcelJS.Worksheet) {
  const pipe = (ws as unknown as { stream?: { pipes?: SheetPipe[] } }).stream?.pipes?.[0]
  if (!pipe) return
  // archiver's PassThrough comes from readable-stream, which may lack writableLength/readableLength
  const waiting = () =>
    (pipe.writableLength ?? pipe._writableState?.length ?? 0) +
    (pipe.readableLength ?? pipe._readableState?.length ?? 0)
  for (let left = waiting(), since = Date.now(); left > BACKLOG;) {
    await new Promise((r) => setTimeout(r, 2))
    const now = waiting()
    if (now < left) since = Date.now()
    else if (Date.now() - since > STALL_MS) throw new Error('the workbook stopped being written (zip stalled)')
    left = now
  }
}

function finish(ws: ExcelJS.Worksheet) {
  const w = ws as ExcelJS.Worksheet & { commit?: () => void }
  if (typeof w.commit === 'function') w.commit()
}

export async function writeMaterials({ db, book, tick }: SheetContext) {
  const ws = addStyledSheet(book, 'Materials', [
    { header: 'Name', key: 'name', width: 22 },
    { header: 'Formula', key: 'formula', width: 12 },
    { header: 'Point group', key: 'pointGroup', width: 11 },
    { header: 'Band gap (eV)', key: 'bandGapEv', width: 12 },
    { header: 'Transparency', key: 'transparencyNote', width: 24 },
    { header: 'Coefficients (pm/V @ nm)', key: 'coefficients', width: 40 },
    { header: 'Notes', key: 'notes', width: 30 },
    utc('Retired', 'retiredAt'),
    utc('Created', 'createdAt'),
  ])
  await eachBatch(
    ws,
    (after) => db.select().from(materials).where(gt(materials.id, after)).orderBy(asc(materials.id)).limit(BATCH),
    (r) => r.id,
    (rows) => {
      for (const m of rows) {
        const coefficients = m.coefficients
          .map((c) => `${c.component}=${c.valuePmV} @ ${c.wavelengthNm} nm${c.isTypical ? ' (typical)' : ''}`)
          .join('; ')
        addSafeRow(ws, { ...m, coefficients })
      }
      tick(rows.length)
    },
  )
  finish(ws)
}

export async function writeWafers({ db, book, tick }: SheetContext) {
  const refs = await locationRefs(db)
  const ws = addStyledSheet(book, 'Wafers', [
    ...importable(WAFER_COLUMNS),
    { header: 'Point group', key: 'pointGroup', width: 11 },
    { header: 'Cut', key: 'cut', width: 10 },
    { header: 'Chips', key: 'chips', width: 8 },
    { header: 'Created by', key: 'createdBy', width: 20 },
    utc('Created', 'createdAt'),
  ])
  await eachBatch(
    ws,
    (after) =>
      db
        .select({ w: wafers, material: materials.name, pointGroup: materials.pointGroup, by: users.name })
        .from(wafers)
        .innerJoin(materials, eq(materials.id, wafers.materialId))
        .innerJoin(users, eq(users.id, wafers.createdBy))
        .where(gt(wafers.id, after))
        .orderBy(asc(wafers.id))
        .limit(BATCH),
    (r) => r.w.id,
    async (rows) => {
      const counts = await db
        .select({ waferId: chips.waferId, id: chips.id })
        .from(chips)
        .where(
          inArray(
            chips.waferId,
            rows.map((r) => r.w.id),
          ),
        )
      for (const { w, material, pointGroup, by } of rows) {
        addSafeRow(ws, {
          ref: w.code,
          material,
          cutNormal: vectorText(w.cutNormal),
          flatDirection: vectorText(w.flatDirection),
          diameterMm: w.diameterMm,
          thicknessUm: w.thicknessUm,
          lot: w.lot,
          supplier: w.supplier,
          receivedOn: dateOnly(w.receivedOn),
          location: w.locationId ? refs.get(w.locationId)?.code : null,
          status: w.status,
          notes: w.notes,
          version: versionOf(w.updatedAt),
          pointGroup,
          cut: cutLabel(pointGroup, w.cutNormal),
          chips: counts.filter((c) => c.waferId === w.id).length,
          createdBy: by,
          createdAt: w.createdAt,
        })
      }
      tick(rows.length)
    },
  )
  finish(ws)
}

export async function writeChips({ db, book, tick }: SheetContext) {
  const refs = await locationRefs(db)
  const ws = addStyledSheet(book, 'Chips', [
    ...importable(CHIP_COLUMNS),
    { header: 'Material', key: 'material', width: 18 },
    { header: 'Holder', key: 'holder', width: 18 },
    utc('Created', 'createdAt'),
  ])
  await eachBatch(
    ws,
    (after) =>
      db
        .select({ c: chips, wafer: wafers.code, material: materials.name, holder: users.name })
        .from(chips)
        .innerJoin(wafers, eq(wafers.id, chips.waferId))
        .innerJoin(materials, eq(materials.id, wafers.materialId))
        .leftJoin(users, eq(users.id, chips.holderId))
        .where(gt(chips.id, after))
        .orderBy(asc(chips.id))
        .limit(BATCH),
    (r) => r.c.id,
    (rows) => {
      for (const { c, wafer, material, holder } of rows) {
        addSafeRow(ws, {
          ref: c.code,
          wafer,
          index: c.index,
          rotationDeg: c.rotationDeg,
          widthMm: c.widthMm,
          heightMm: c.heightMm,
          location: c.locationId ? refs.get(c.locationId)?.code : null,
          status: c.status,
          notes: c.notes,
          version: versionOf(c.updatedAt),
          material,
          holder,
          createdAt: c.createdAt,
        })
      }
      tick(rows.length)
    },
  )
  finish(ws)
}

const HARMONIC = (order: number) => (order === 2 ? 'SHG' : order === 3 ? 'THG' : `H${order}`)
const PUMP_LABEL: Record<string, string> = {
  'circular+1': 'circular +1',
  'circular-1': 'circular −1',
  'linear-along-flat': 'linear along flat',
  'linear-across-flat': 'linear across flat',
}

/** Plain text of normal emission: "no", "yes", "yes co", "yes counter", "yes co + counter". */
export function normalEmissionText(ch: StoredChannel | undefined): string {
  if (!ch) return ''
  const n = ch.result.normalEmission
  if (!n.allowed || n.suppressedByParity) return 'no'
  if (!n.handedness?.length) return 'yes'
  return `yes ${[...new Set(n.handedness.map((h) => (h === 'co-rotating' ? 'co' : 'counter')))].join(' + ')}`
}

export async function writeArrays({ db, book, tick }: SheetContext) {
  const channelCols: SheetColumn[] = STORED_ORDERS.flatMap((order) =>
    STANDARD_PUMPS.flatMap(({ key }) => [
      { header: `${HARMONIC(order)} ${PUMP_LABEL[key]}: allowed m`, key: `${order}|${key}|m`, width: 16 },
      { header: `${HARMONIC(order)} ${PUMP_LABEL[key]}: normal emission`, key: `${order}|${key}|n`, width: 16 },
    ]),
  )
  // One numeric column per dimension of the shapes present (and any other dimension stored), after Shape.
  const [shapeRows] = (await db.execute(sql`SELECT DISTINCT shape FROM arrays`)) as unknown as [{ shape: string }[]]
  const [keyRows] = (await db.execute(sql`SELECT DISTINCT JSON_KEYS(dimensions_nm) AS k FROM arrays`)) as unknown as [
    { k: string | string[] | null }[],
  ]
  const stored = new Set(
    keyRows.flatMap((r) => (typeof r.k === 'string' ? (JSON.parse(r.k) as string[]) : (r.k ?? []))),
  )
  const dims = [
    ...dimensionsOf(shapeRows.map((r) => r.shape)),
    ...[...stored].filter((k) => !FORM_DIMENSIONS.includes(k)).sort(),
  ]
  const dimCols: SheetColumn[] = dims.map((k) => {
    const c = dimensionColumn(k)
    return { header: c.header, key: c.key, width: c.width }
  })
  const base = importable(ARRAY_COLUMNS)
  const atShape = base.findIndex((c) => c.key === 'shape') + 1
  const ws = addStyledSheet(book, 'Arrays', [
    ...base.slice(0, atShape),
    ...dimCols,
    ...base.slice(atShape),
    { header: 'Symmetry', key: 'symmetry', width: 10 },
    { header: 'Engine version', key: 'engineVersion', width: 10 },
    { header: 'Stale', key: 'stale', width: 7 },
    utc('Channels computed', 'channelsComputedAt'),
    utc('Retired', 'retiredAt'),
    utc('Created', 'createdAt'),
    ...channelCols,
  ])
  // Arrays share a few distinct channel sets (stored once, see channel-sets.ts): each set is read
  // and turned into cells once for the whole sheet (and not kept in the channel-set cache after).
  const cells = new Map<string, Record<string, string>>()
  const { chipId: _chip, ...arrayColumns } = getTableColumns(arrays) // the columns the sheet writes
  await eachBatch(
    ws,
    (after) =>
      db
        .select({ a: arrayColumns, chip: chips.code, isStale: staleChannelsSql })
        .from(arrays)
        .innerJoin(chips, eq(chips.id, arrays.chipId))
        .where(gt(arrays.id, after))
        .orderBy(asc(arrays.id))
        .limit(BATCH),
    (r) => r.a.id,
    async (rows) => {
      const sets = await loadChannelSets(
        db,
        rows.map((r) => r.a.channelSetKey).filter((k) => k && !cells.has(k)),
        { remember: false },
      )
      const cellsOf = (key: string | null): Record<string, string> => {
        if (!key) return {}
        let c = cells.get(key)
        if (!c) {
          c = {}
          for (const ch of sets.get(key) ?? []) {
            c[`${ch.order}|${ch.pumpKey}|m`] = ch.result.m.join(', ')
            c[`${ch.order}|${ch.pumpKey}|n`] = normalEmissionText(ch)
          }
          cells.set(key, c)
        }
        return c
      }
      for (const { a, chip, isStale } of rows) {
        const row: Record<string, unknown> = {
          ref: a.code,
          chip,
          position: a.position,
          shape: a.shape,
          ...Object.fromEntries(Object.entries(a.dimensionsNm).map(([k, v]) => [`dim:${k}`, v])),
          shapeAzimuthDeg: a.shapeAzimuthDeg,
          lattice: a.lattice,
          periodXNm: a.periodXNm,
          periodYNm: a.periodYNm,
          azimuthDeg: a.azimuthDeg,
          count: a.count,
          customRotationOrder: a.customRotationOrder,
          customMirrors: a.customMirrors?.join(', ') ?? null,
          notes: a.notes,
          version: versionOf(a.updatedAt),
          symmetry: a.symmetryName,
          engineVersion: a.engineVersion,
          stale: Number(isStale) === 1 ? 'yes' : 'no',
          channelsComputedAt: a.channelsComputedAt,
          retiredAt: a.retiredAt,
          createdAt: a.createdAt,
        }
        Object.assign(row, cellsOf(a.channelSetKey))
        addSafeRow(ws, row)
      }
      tick(rows.length)
    },
  )
  finish(ws)
}

const pumpText = (p: PumpSpec) =>
  p.type === 'circular' ? `circular ${p.m > 0 ? '+1' : '−1'}` : p.type === 'linear' ? `linear ${p.angle}°` : p.type

export async function writeSessions({ db, book, tick }: SheetContext) {
  const operators = alias(users, 'operators')
  // Thousands of results share a few hundred predictions (same design, wafer, pump and order).
  const compare = rememberingCompare()
  const ws = addStyledSheet(book, 'Sessions', [
    { header: 'Session', key: 'code', width: 10 },
    utc('Performed', 'performedAt'),
    { header: 'Laser setup', key: 'setup', width: 12 },
    { header: 'Operator', key: 'operator', width: 18 },
    { header: 'Wavelength (nm)', key: 'wavelengthNm', width: 14 },
    { header: 'Order', key: 'order', width: 7 },
    { header: 'Pump', key: 'pump', width: 14 },
    { header: 'Average power (mW)', key: 'avgPowerMw', width: 14 },
    { header: 'Array', key: 'array', width: 16 },
    { header: 'Harmonic power (W)', key: 'harmonicPowerW', width: 14 },
    { header: 'Observed normal', key: 'observedNormal', width: 14 },
    { header: 'Observed m', key: 'observedM', width: 12 },
    { header: 'Predicted m', key: 'predictedM', width: 14 },
    { header: 'Predicted normal emission', key: 'predictedNormal', width: 16 },
    { header: 'Predicted vs observed', key: 'flags', width: 60 },
    { header: 'Notes', key: 'notes', width: 30 },
  ])
  const session = {
    id: ms.id,
    code: ms.code,
    performedAt: ms.performedAt,
    wavelengthNm: ms.wavelengthNm,
    harmonicOrder: ms.harmonicOrder,
    pump: ms.pump,
    avgPowerMw: ms.avgPowerMw,
  }
  await eachBatch(
    ws,
    (after) =>
      db
        .select({ s: session, setup: laserSetups.code, operator: operators.name })
        .from(ms)
        .innerJoin(laserSetups, eq(laserSetups.id, ms.laserSetupId))
        .innerJoin(operators, eq(operators.id, ms.operatorId))
        .where(gt(ms.id, after))
        .orderBy(asc(ms.id))
        .limit(200),
    (r) => r.s.id,
    async (rows) => {
      const results = await db
        .select()
        .from(sessionResults)
        .where(
          inArray(
            sessionResults.sessionId,
            rows.map((r) => r.s.id),
          ),
        )
      const ctx = await loadArrayContexts(db, [...new Set(results.map((r) => r.arrayId))])
      const bySession = new Map<number, typeof results>()
      for (const r of results) {
        const list = bySession.get(r.sessionId)
        if (list) list.push(r)
        else bySession.set(r.sessionId, [r])
      }
      for (const { s, setup, operator } of rows) {
        for (const r of bySession.get(s.id) ?? []) {
          const a = ctx.get(r.arrayId)
          let predicted = '',
            predictedNormal = '',
            flags = ''
          try {
            const cmp = a ? compare(a, r, s.pump, s.harmonicOrder) : null
            if (cmp) {
              predicted = cmp.predicted.m.join(', ')
              predictedNormal = normalEmissionText({
                order: s.harmonicOrder,
                pumpKey: '',
                pump: s.pump,
                result: cmp.predicted,
              })
              flags = cmp.flags.length ? cmp.flags.join(' ') : 'consistent'
            }
          } catch (err) {
            flags = `no prediction: ${(err as Error).message}`
          }
          addSafeRow(ws, {
            code: s.code,
            performedAt: s.performedAt,
            setup,
            operator,
            wavelengthNm: s.wavelengthNm,
            order: s.harmonicOrder,
            pump: pumpText(s.pump),
            avgPowerMw: s.avgPowerMw,
            array: a?.code ?? r.arrayId,
            harmonicPowerW: r.harmonicPowerW,
            observedNormal: r.observedNormal,
            observedM: r.observedM.join(', '),
            predictedM: predicted,
            predictedNormal,
            flags,
            notes: r.notes,
          })
        }
      }
      tick(results.length)
    },
  )
  finish(ws)
}

export async function writeLocations({ db, book, tick }: SheetContext) {
  const refs = await locationRefs(db)
  const ws = addStyledSheet(book, 'Locations', [
    { header: 'Code', key: 'code', width: 10 },
    { header: 'Kind', key: 'kind', width: 9 },
    { header: 'Name', key: 'name', width: 20 },
    { header: 'Parent', key: 'parent', width: 10 },
    { header: 'Path', key: 'path', width: 40 },
    { header: 'Notes', key: 'notes', width: 30 },
    utc('Retired', 'retiredAt'),
    utc('Created', 'createdAt'),
  ])
  await eachBatch(
    ws,
    (after) => db.select().from(locations).where(gt(locations.id, after)).orderBy(asc(locations.id)).limit(BATCH),
    (r) => r.id,
    (rows) => {
      for (const l of rows) {
        addSafeRow(ws, { ...l, parent: l.parentId ? refs.get(l.parentId)?.code : null, path: refs.get(l.id)?.path })
      }
      tick(rows.length)
    },
  )
  finish(ws)
}

/*
 * Read-only sheets (the importer does not read them): fabrication steps, laser setups with their
 * register fields and sign-off state, moves, and the metadata of uploaded files.
 */
export async function writeFabSteps({ db, book, tick }: SheetContext) {
  const ws = addStyledSheet(book, 'Fabrication', [
    { header: 'Chip', key: 'chip', width: 14 },
    { header: 'Step', key: 'kind', width: 12 },
    { header: 'Parameters', key: 'params', width: 50 },
    { header: 'Operator', key: 'operator', width: 18 },
    utc('Performed', 'performedAt'),
    { header: 'Notes', key: 'notes', width: 30 },
    utc('Recorded', 'createdAt'),
  ])
  await eachBatch(
    ws,
    (after) =>
      db
        .select({ f: fabSteps, chip: chips.code, operator: users.name })
        .from(fabSteps)
        .innerJoin(chips, eq(chips.id, fabSteps.chipId))
        .innerJoin(users, eq(users.id, fabSteps.operatorId))
        .where(gt(fabSteps.id, after))
        .orderBy(asc(fabSteps.id))
        .limit(BATCH),
    (r) => r.f.id,
    (rows) => {
      for (const { f, chip, operator } of rows) {
        addSafeRow(ws, {
          chip,
          kind: f.kind.replace('_', '-'),
          params: describeFabParams(f.kind, f.params)
            .map((d) => `${d.label}: ${d.value}`)
            .join('; '),
          operator,
          performedAt: f.performedAt,
          notes: f.notes,
          createdAt: f.createdAt,
        })
      }
      tick(rows.length)
    },
  )
  finish(ws)
}

const SIGNOFF_TEXT: Record<string, string> = {
  draft: 'draft (not submitted)',
  waiting: 'waiting for sign-off',
  approved: 'approved',
  expired: 'approval expired',
  rejected: 'rejected',
  revoked: 'revoked',
  voided: 'voided (hazard fields changed)',
}

export async function writeLaserSetups({ db, book, tick }: SheetContext) {
  const ws = addStyledSheet(book, 'Laser setups', [
    { header: 'Code', key: 'code', width: 10 },
    { header: 'Name', key: 'name', width: 22 },
    { header: 'Room', key: 'room', width: 10 },
    { header: 'Source', key: 'sourceType', width: 12 },
    { header: 'Wavelengths (nm)', key: 'wavelengths', width: 16 },
    { header: 'Laser class', key: 'laserClass', width: 10 },
    { header: 'Max average power (mW)', key: 'maxAvgPowerMw', width: 14 },
    { header: 'Pulse duration (fs)', key: 'pulseDurationFs', width: 12 },
    { header: 'Repetition rate (Hz)', key: 'repRateHz', width: 14 },
    { header: 'Pulse energy (µJ)', key: 'pulseEnergyUj', width: 12 },
    { header: 'Beam diameter (mm)', key: 'beamDiameterMm', width: 12 },
    { header: 'Divergence (mrad)', key: 'divergenceMrad', width: 12 },
    { header: 'Harmonic orders', key: 'harmonicOrders', width: 10 },
    { header: 'Eyewear', key: 'eyewear', width: 40 },
    { header: 'Interlocks', key: 'interlocks', width: 30 },
    { header: 'Controlled area', key: 'controlledAreaNotes', width: 30 },
    { header: 'Submitted by', key: 'submitter', width: 18 },
    utc('Submitted', 'submittedAt'),
    { header: 'Sign-off', key: 'state', width: 20 },
    { header: 'Sessions may be logged today', key: 'isValid', width: 12 },
    { header: 'Decided by', key: 'by', width: 18 },
    utc('Decided', 'at'),
    { header: 'Approval expires on', key: 'expiresOn', width: 13 },
    { header: 'Decision note', key: 'note', width: 30 },
    { header: 'Notes', key: 'notes', width: 30 },
    utc('Retired', 'retiredAt'),
  ])
  await eachBatch(
    ws,
    (after) => db.select().from(laserSetups).where(gt(laserSetups.id, after)).orderBy(asc(laserSetups.id)).limit(BATCH),
    (r) => r.id,
    async (rows) => {
      for (const l of await withSignoffs(db, rows)) {
        const eyewear = l.eyewear
          .map((e) =>
            [e.description, e.bandsNm && `${e.bandsNm} nm`, e.od !== null && `OD ${e.od}`, e.en207]
              .filter(Boolean)
              .join(', '),
          )
          .join('; ')
        addSafeRow(ws, {
          ...l,
          wavelengths: l.wavelengthsNm.join(', '),
          harmonicOrders: l.harmonicOrders.join(', '),
          eyewear,
          submitter: l.submitter?.name ?? null,
          submittedAt: l.submittedAt ? new Date(l.submittedAt) : null,
          state: SIGNOFF_TEXT[l.signoff.state] ?? l.signoff.state,
          isValid: l.signoff.isValid ? 'yes' : 'no',
          by: l.signoff.by?.name ?? null,
          at: l.signoff.at ? new Date(l.signoff.at) : null,
          expiresOn: l.signoff.expiresOn,
          note: l.signoff.note,
          retiredAt: l.retiredAt ? new Date(l.retiredAt) : null,
        })
      }
      tick(rows.length)
    },
  )
  finish(ws)
}

export async function writeMoves({ db, book, tick }: SheetContext) {
  const refs = await locationRefs(db)
  const handedTo = alias(users, 'handed_to')
  const ws = addStyledSheet(book, 'Moves', [
    { header: 'Item', key: 'itemKind', width: 9 },
    { header: 'Code', key: 'itemCode', width: 14 },
    { header: 'From', key: 'from', width: 30 },
    { header: 'To', key: 'to', width: 30 },
    { header: 'Handed to', key: 'handedTo', width: 18 },
    { header: 'Moved by', key: 'movedBy', width: 18 },
    utc('Moved', 'movedAt'),
    { header: 'Note', key: 'note', width: 30 },
  ])
  const place = (id: number | null) => (id ? (refs.get(id)?.path ?? refs.get(id)?.code ?? String(id)) : null)
  await eachBatch(
    ws,
    (after) =>
      db
        .select({ m: moves, by: users.name, to: handedTo.name })
        .from(moves)
        .innerJoin(users, eq(users.id, moves.movedBy))
        .leftJoin(handedTo, eq(handedTo.id, moves.handedToId))
        .where(gt(moves.id, after))
        .orderBy(asc(moves.id))
        .limit(BATCH),
    (r) => r.m.id,
    (rows) => {
      for (const { m, by, to } of rows)
        addSafeRow(ws, {
          itemKind: m.itemKind,
          itemCode: m.itemCode,
          from: place(m.fromLocationId),
          to: place(m.toLocationId),
          handedTo: to,
          movedBy: by,
          movedAt: m.movedAt,
          note: m.note,
        })
      tick(rows.length)
    },
  )
  finish(ws)
}

export async function writeFiles({ db, book, tick }: SheetContext) {
  const ws = addStyledSheet(book, 'Files', [
    { header: 'File name', key: 'originalName', width: 30 },
    { header: 'Kind', key: 'kind', width: 10 },
    { header: 'Type', key: 'mime', width: 18 },
    { header: 'Size (bytes)', key: 'sizeBytes', width: 12 },
    { header: 'SHA-256', key: 'sha256', width: 20 },
    { header: 'Attached to', key: 'entity', width: 12 },
    { header: 'Record id', key: 'entityId', width: 9 },
    { header: 'Uploaded by', key: 'by', width: 18 },
    utc('Uploaded', 'uploadedAt'),
    utc('Retired', 'retiredAt'),
  ])
  await eachBatch(
    ws,
    (after) =>
      db
        .select({ f: files, by: users.name })
        .from(files)
        .innerJoin(users, eq(users.id, files.uploadedBy))
        .where(gt(files.id, after))
        .orderBy(asc(files.id))
        .limit(BATCH),
    (r) => r.f.id,
    (rows) => {
      for (const { f, by } of rows) addSafeRow(ws, { ...f, by })
      tick(rows.length)
    },
  )
  finish(ws)
}
