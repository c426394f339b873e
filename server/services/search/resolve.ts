import { eq, like, or, desc } from 'drizzle-orm'
import { wafers, chips, arrays, locations, materials, measurementSessions, laserSetups } from '../../db/schema/index'
import type { Db } from '../../db/client'
import type { ResolvedCode } from '../../../shared/records'
import type { SearchHit } from '../../../shared/types'
import { NotFoundError } from '../../errors'
import { likePattern } from '../inventory/codes'
import { cutLabel } from '../inventory/cut-label'
import { locationRefs } from '../inventory/locations'
import { plainRows } from '../../db/plain-rows'
import { codePrefixes, fulltextQuery, matchWords, prefixPattern } from './text-search'

/**
 * Codes → records: `resolveCode` answers a scanned or typed code (any case, or a resolver URL
 * ending in /s/<code>); `searchRecords` is the records part of the global search.
 */
export async function resolveCode(db: Db, raw: string): Promise<ResolvedCode> {
  const code = raw.trim().split('/').filter(Boolean).pop()?.toUpperCase() ?? ''
  const hit = await findByCode(db, code)
  if (!hit) throw new NotFoundError(`No record has the code ${code || '(empty)'}. Check the label, or search for it.`)
  return hit
}

async function findByCode(db: Db, code: string): Promise<ResolvedCode | undefined> {
  if (code.startsWith('LS-')) {
    const [r] = await db.select().from(laserSetups).where(eq(laserSetups.code, code))
    return (
      r && { kind: 'laser_setup', id: r.id, code: r.code, to: `/laser-setups/${r.id}`, label: `${r.code} · ${r.name}` }
    )
  }
  if (code.startsWith('W-')) {
    const [r] = await db
      .select({ w: wafers, m: materials.name, pg: materials.pointGroup })
      .from(wafers)
      .innerJoin(materials, eq(materials.id, wafers.materialId))
      .where(eq(wafers.code, code))
    return (
      r && {
        kind: 'wafer',
        id: r.w.id,
        code: r.w.code,
        to: `/wafers/${r.w.id}`,
        label: `${r.w.code} · ${r.m} ${cutLabel(r.pg, r.w.cutNormal)} · lot ${r.w.lot}`,
      }
    )
  }
  if (code.startsWith('C-')) {
    const [r] = await db.select().from(chips).where(eq(chips.code, code))
    return (
      r && {
        kind: 'chip',
        id: r.id,
        code: r.code,
        to: `/chips/${r.id}`,
        label: `${r.code} · chip ${r.index}, rotated ${r.rotationDeg}° from the flat`,
      }
    )
  }
  if (code.startsWith('A-')) {
    const [r] = await db.select().from(arrays).where(eq(arrays.code, code))
    return (
      r && {
        kind: 'array',
        id: r.id,
        code: r.code,
        to: `/arrays/${r.id}`,
        label: `${r.code} · ${r.shape} on a ${r.lattice} lattice${r.symmetryName ? ` (${r.symmetryName})` : ''}`,
      }
    )
  }
  if (code.startsWith('L-')) {
    const [r] = await db.select().from(locations).where(eq(locations.code, code))
    const path = r && (await locationRefs(db)).get(r.id)?.path
    return (
      r && {
        kind: 'location',
        id: r.id,
        code: r.code,
        to: `/locations/${r.id}`,
        label: `${r.code} · ${path ?? r.name}`,
      }
    )
  }
  if (code.startsWith('S-')) {
    const [r] = await db.select().from(measurementSessions).where(eq(measurementSessions.code, code))
    return (
      r && {
        kind: 'session',
        id: r.id,
        code: r.code,
        to: `/sessions/${r.id}`,
        label: `${r.code} · ${r.wavelengthNm} nm, order ${r.harmonicOrder}, ${r.performedAt.toISOString().slice(0, 10)}`,
      }
    )
  }
  return undefined
}

/** Up to `limit` rows found by code prefix or by FULLTEXT words (`'ft'`), merged by id, in key order. */
async function byCodeOrWords<R extends { id: number }>(
  prefixes: string[],
  ft: string | null,
  limit: number,
  find: (what: string) => Promise<R[]>,
  key: (r: R) => string,
  dir: 'asc' | 'desc' = 'asc',
): Promise<R[]> {
  const found = await Promise.all([...prefixes.map((p) => find(p)), ...(ft ? [find('ft')] : [])])
  const byId = new Map(found.flat().map((r) => [r.id, r]))
  const rows = [...byId.values()].sort((a, b) => key(a).localeCompare(key(b)))
  return (dir === 'desc' ? rows.reverse() : rows).slice(0, limit)
}

type Ranked = SearchHit & { rank: number }
const rankOf = (code: string, q: string) =>
  code.toUpperCase() === q.toUpperCase() ? 0 : code.toUpperCase().startsWith(q.toUpperCase()) ? 1 : 2

/** Records matching `q`: codes (exact, then prefix), lots, suppliers, notes, material names. Exact code first. */
export async function searchRecords(db: Db, q: string, perKind = 8): Promise<SearchHit[]> {
  const any = likePattern(q),
    prefix = likePattern(q, true)
  // The big tables (chips, arrays, sessions): codes by prefix and notes by FULLTEXT words, each an
  // index lookup (an OR of both, or LIKE '%…%', scans 100 000 rows); see text-search.ts.
  // Each query reads only the columns of its hit, through plainRows (no per-field mapping).
  const ft = await fulltextQuery(db, q)
  const cache = { cache: true }
  const [ws, cs, as, ls, ms, ss, lss, refs] = await Promise.all([
    plainRows(
      db,
      {
        id: wafers.id,
        code: wafers.code,
        cutNormal: wafers.cutNormal,
        lot: wafers.lot,
        supplier: wafers.supplier,
        m: materials.name,
        pg: materials.pointGroup,
      },
      (f) =>
        db
          .select(f)
          .from(wafers)
          .innerJoin(materials, eq(materials.id, wafers.materialId))
          .where(
            or(
              like(wafers.code, prefix),
              like(wafers.lot, any),
              like(wafers.supplier, any),
              like(wafers.notes, any),
              like(materials.name, any),
            ),
          )
          .orderBy(wafers.code)
          .limit(perKind),
      cache,
    ),
    byCodeOrWords(
      codePrefixes(q, 'C', false),
      ft,
      perKind,
      (w) =>
        plainRows(
          db,
          { id: chips.id, code: chips.code, index: chips.index, rotationDeg: chips.rotationDeg, status: chips.status },
          (f) =>
            db
              .select(f)
              .from(chips)
              .where(w === 'ft' ? matchWords(['notes'], ft!) : like(chips.code, prefixPattern(w)))
              .orderBy(chips.code)
              .limit(perKind),
          cache,
        ),
      (r) => r.code,
    ),
    byCodeOrWords(
      codePrefixes(q, 'A', false),
      ft,
      perKind,
      (w) =>
        plainRows(
          db,
          {
            id: arrays.id,
            code: arrays.code,
            shape: arrays.shape,
            lattice: arrays.lattice,
            symmetryName: arrays.symmetryName,
          },
          (f) =>
            db
              .select(f)
              .from(arrays)
              .where(w === 'ft' ? matchWords(['notes'], ft!) : like(arrays.code, prefixPattern(w)))
              .orderBy(arrays.code)
              .limit(perKind),
          cache,
        ),
      (r) => r.code,
    ),
    plainRows(
      db,
      { id: locations.id, code: locations.code, name: locations.name },
      (f) =>
        db
          .select(f)
          .from(locations)
          .where(or(like(locations.code, prefix), like(locations.name, any)))
          .orderBy(locations.code)
          .limit(perKind),
      cache,
    ),
    plainRows(
      db,
      { id: materials.id, name: materials.name, formula: materials.formula, pointGroup: materials.pointGroup },
      (f) =>
        db
          .select(f)
          .from(materials)
          .where(or(like(materials.name, any), like(materials.formula, any)))
          .orderBy(materials.name)
          .limit(perKind),
      cache,
    ),
    byCodeOrWords(
      codePrefixes(q, 'S', false),
      ft,
      perKind,
      (w) =>
        plainRows(
          db,
          {
            id: measurementSessions.id,
            code: measurementSessions.code,
            wavelengthNm: measurementSessions.wavelengthNm,
            harmonicOrder: measurementSessions.harmonicOrder,
            performedAt: measurementSessions.performedAt,
          },
          (f) =>
            db
              .select(f)
              .from(measurementSessions)
              .where(
                w === 'ft' ? matchWords(['notes', 'detector'], ft!) : like(measurementSessions.code, prefixPattern(w)),
              )
              .orderBy(desc(measurementSessions.performedAt), desc(measurementSessions.id))
              .limit(perKind),
          cache,
        ),
      (r) => r.performedAt.toISOString(),
      'desc',
    ),
    plainRows(
      db,
      { id: laserSetups.id, code: laserSetups.code, name: laserSetups.name },
      (f) =>
        db
          .select(f)
          .from(laserSetups)
          .where(or(like(laserSetups.code, prefix), like(laserSetups.name, any)))
          .orderBy(laserSetups.code)
          .limit(perKind),
      cache,
    ),
    locationRefs(db),
  ])
  const hits: Ranked[] = [
    ...ws.map((w) => ({
      kind: 'wafer' as const,
      id: w.id,
      label: w.code,
      detail: `${w.m} ${cutLabel(w.pg, w.cutNormal)} · lot ${w.lot}${w.supplier ? ` · ${w.supplier}` : ''}`,
      to: `/wafers/${w.id}`,
      rank: rankOf(w.code, q),
    })),
    ...cs.map((c) => ({
      kind: 'chip' as const,
      id: c.id,
      label: c.code,
      detail: `chip ${c.index} · ${c.rotationDeg}° from the flat · ${c.status}`,
      to: `/chips/${c.id}`,
      rank: rankOf(c.code, q),
    })),
    ...as.map((a) => ({
      kind: 'array' as const,
      id: a.id,
      label: a.code,
      detail: `${a.shape} · ${a.lattice} lattice${a.symmetryName ? ` · ${a.symmetryName}` : ''}`,
      to: `/arrays/${a.id}`,
      rank: rankOf(a.code, q),
    })),
    ...ls.map((l) => ({
      kind: 'location' as const,
      id: l.id,
      label: l.code,
      detail: refs.get(l.id)?.path ?? l.name,
      to: `/locations/${l.id}`,
      rank: rankOf(l.code, q),
    })),
    ...ms.map((m) => ({
      kind: 'material' as const,
      id: m.id,
      label: m.name,
      detail: `${m.formula} · point group ${m.pointGroup}`,
      to: `/materials/${m.id}`,
      rank: m.name.toUpperCase() === q.toUpperCase() ? 0 : 2,
    })),
    ...ss.map((s) => ({
      kind: 'session' as const,
      id: s.id,
      label: s.code,
      detail: `${s.wavelengthNm} nm · order ${s.harmonicOrder} · ${s.performedAt.toISOString().slice(0, 10)}`,
      to: `/sessions/${s.id}`,
      rank: rankOf(s.code, q),
    })),
    ...lss.map((l) => ({
      kind: 'laser_setup' as const,
      id: l.id,
      label: l.code,
      detail: l.name,
      to: `/laser-setups/${l.id}`,
      rank: rankOf(l.code, q),
    })),
  ]
  return hits.sort((a, b) => a.rank - b.rank || a.label.localeCompare(b.label)).map(({ rank: _r, ...h }) => h)
}
