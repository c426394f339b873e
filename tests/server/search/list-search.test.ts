import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import type TestAgent from 'supertest/lib/agent'
import { startTestApp, signedInAs } from '../helpers'
import { disk, makeChip, makeWafer, uid } from '../inventory-helpers'
import { makeLaserSetup, makeSample, sessionBody } from '../measurements/fixtures-measurements'
import { codePrefixes, fulltextQuery } from '../../../server/services/search/text-search'
import { getChip, listChips } from '../../../server/services/inventory/chips'
import { getSession, listSessions } from '../../../server/services/measurements/sessions'
import { getWafer, listWafers } from '../../../server/services/inventory/wafers'
import type { Page } from '../../../shared/records'

/**
 * The search boxes of the big lists use index lookups (code prefixes, FULLTEXT words in notes):
 * these tests pin down what a person can type and still find the record.
 */
let t: Awaited<ReturnType<typeof startTestApp>>
let fab: TestAgent, optics: TestAgent
beforeAll(async () => {
  t = await startTestApp()
  fab = await signedInAs(t.app, 'fab_technician')
  optics = await signedInAs(t.app, 'optics_staff')
})
afterAll(async () => {
  await t.stop()
})

const codes = (body: { rows: { code: string }[] }) => body.rows.map((r) => r.code).sort()

describe('code prefixes', () => {
  it('leave the kind letter optional and map nested codes in lists only', () => {
    expect(codePrefixes('0012-03', 'A')).toEqual(['A-0012-03'])
    expect(codePrefixes(' c-0012-03 ', 'A')).toEqual(['A-0012-03', 'C-0012-03'])
    expect(codePrefixes('A-0012', 'A')).toEqual(['A-0012'])
    expect(codePrefixes('C-0012', 'A', false)).toEqual(['C-0012'])
    expect(codePrefixes('  ', 'A')).toEqual([])
    // a session or location code is not a parent of arrays, whatever its digits
    expect(codePrefixes('S-0086', 'A')).toEqual(['S-0086'])
    expect(codePrefixes('L-0012', 'C')).toEqual(['L-0012'])
    expect(codePrefixes('W-0012', 'C')).toEqual(['C-0012', 'W-0012'])
  })

  it('turn typed words into a boolean FULLTEXT query without operators, short words or stop words', async () => {
    expect(await fulltextQuery(t.db, 'dose te')).toBe('+dose*')
    expect(await fulltextQuery(t.db, 'resist +peel* (edge)')).toBe('+resist* +peel* +edge*')
    // "the" is in MariaDB's default stop-word list; "%_%" has no word at all
    expect(await fulltextQuery(t.db, 'the')).toBeNull()
    expect(await fulltextQuery(t.db, '%_%')).toBeNull()
  })
})

describe('list search boxes', () => {
  it('arrays: by own code, by chip code with or without its letter, and by a word of the notes', async () => {
    const { chip } = await makeChip(fab)
    const tag = uid()
    await fab.post('/api/arrays').send({ ...disk(chip.id, 'A1'), notes: `dose ladder ${tag} first row` })
    await fab.post('/api/arrays').send(disk(chip.id, 'B2'))
    const both = [`A-${chip.code.slice(2)}-A1`, `A-${chip.code.slice(2)}-B2`]
    expect(codes((await fab.get(`/api/arrays?q=${chip.code}`)).body)).toEqual(both)
    expect(codes((await fab.get(`/api/arrays?q=${chip.code.slice(2)}`)).body)).toEqual(both)
    expect(codes((await fab.get(`/api/arrays?q=${both[1].toLowerCase()}`)).body)).toEqual([both[1]])
    const byWord = (await fab.get(`/api/arrays?q=${encodeURIComponent(`ladder ${tag}`)}`)).body
    expect(codes(byWord)).toEqual([both[0]])
    expect(byWord.total).toBe(1)
  })

  it('chips: by wafer code, by a word of the notes, by the wafer lot', async () => {
    const tag = uid()
    const { wafer, chip } = await makeChip(fab, {}, { lot: `LOT-${tag}` })
    await fab.patch(`/api/chips/${chip.id}`).send({ notes: `cracked corner ${tag}` })
    expect(codes((await fab.get(`/api/chips?q=${wafer.code}`)).body)).toEqual([chip.code])
    expect(codes((await fab.get(`/api/chips?q=${encodeURIComponent(`cracked ${tag}`)}`)).body)).toEqual([chip.code])
    expect(codes((await fab.get(`/api/chips?q=${tag}`)).body)).toEqual([chip.code])
  })

  it('sessions: by an array code prefix, by a word of the notes or the detector', async () => {
    const { chip } = await makeChip(fab)
    const a = (await fab.post('/api/arrays').send(disk(chip.id, 'C3'))).body
    const setup = await makeLaserSetup(t.db)
    const tag = uid()
    const made = await optics
      .post('/api/sessions')
      .send(sessionBody(setup.id, [a.id], { notes: `alignment drifted ${tag}`, detector: `Cooled CCD ${tag}x` }))
    expect(made.status).toBe(201)
    const find = async (q: string) => codes((await optics.get(`/api/sessions?q=${encodeURIComponent(q)}`)).body)
    expect(await find(a.code)).toEqual([made.body.code])
    expect(await find(chip.code)).toEqual([made.body.code])
    expect(await find(`drifted ${tag}`)).toEqual([made.body.code])
    expect(await find(`${tag}x`)).toEqual([made.body.code])
    expect(await find(made.body.code)).toEqual([made.body.code])
  })
})

/**
 * The chips and sessions lists cut their page in a derived table and join the rest in the same
 * statement: pages must follow the sort (ties by id), neither overlap nor leave a gap, carry the
 * total of the filtered rows, and build each row as the detail does.
 */
describe('list paging', () => {
  const first = { page: 1, pageSize: 2, dir: 'asc' as const, includeRetired: false }
  /** Every page up to the first empty one: the rows in order and the total each page gave. */
  async function allPages<R>(list: (page: number) => Promise<Page<R>>) {
    const rows: R[] = [],
      totals: number[] = []
    for (let page = 1; page <= 10; page++) {
      const p = await list(page)
      totals.push(p.total)
      if (!p.rows.length) break
      rows.push(...p.rows)
    }
    return { rows, totals }
  }

  it('chips: sorted pages of two, asc and desc, with the filters applied and rows as the detail shows them', async () => {
    const tag = uid()
    const made: { id: number; code: string }[] = []
    const waferIds: number[] = []
    for (const part of ['A', 'B']) {
      const { wafer } = await makeWafer(fab, { lot: `LOT-${tag}-${part}` })
      const res = await fab.post(`/api/wafers/${wafer.id}/dice`).send({ count: 3, widthMm: 5, heightMm: 5 })
      expect(res.status).toBe(201)
      made.push(...res.body.chips)
      waferIds.push(wafer.id)
    }
    expect((await fab.post(`/api/chips/${made[4].id}/retire`).send({ reason: 'lost' })).status).toBe(200)
    expect((await fab.post('/api/arrays').send(disk(made[0].id, 'A1'))).status).toBe(201)
    // made in code order (wafer A before B, index 1…3), and ids grow with the codes
    const active = made.filter((c) => c.id !== made[4].id).map((c) => c.code)
    for (const sort of [undefined, 'code', 'wafer', 'status', 'rotationDeg', 'createdAt'])
      for (const dir of ['asc', 'desc'] as const) {
        const { rows, totals } = await allPages((page) => listChips(t.db, { ...first, page, sort, dir, q: tag }))
        expect(
          rows.map((r) => r.code),
          `${sort} ${dir}`,
        ).toEqual(dir === 'asc' ? active : [...active].reverse())
        expect(totals).toEqual([5, 5, 5, 5])
      }
    const all = await allPages((page) =>
      listChips(t.db, { ...first, page, q: tag, includeRetired: true, sort: 'wafer', dir: 'desc' }),
    )
    expect(all.rows.map((r) => r.code)).toEqual(made.map((c) => c.code).reverse())
    expect(all.totals).toEqual([6, 6, 6, 6])
    expect((await listChips(t.db, { ...first, q: tag, status: 'retired' })).rows.map((r) => r.code)).toEqual([
      made[4].code,
    ])
    const ofA = await allPages((page) => listChips(t.db, { ...first, page, parentId: waferIds[0], dir: 'desc' }))
    expect(ofA.rows.map((r) => r.code)).toEqual(
      made
        .slice(0, 3)
        .map((c) => c.code)
        .reverse(),
    )
    expect(ofA.totals).toEqual([3, 3, 3])
    for (const row of all.rows) expect(row).toEqual(await getChip(t.db, row.id))
    expect(all.rows.at(-1)).toMatchObject({
      arrayCount: 1,
      wafer: { id: waferIds[0], cutLabel: '(001)' },
      holder: null,
    })
  })

  it('wafers: ties of the sort column come in id order in both directions, so pages neither overlap nor leave a gap', async () => {
    const { material, wafer } = await makeWafer(fab)
    const ids = [wafer.id]
    for (let i = 0; i < 2; i++) {
      const res = await fab.post('/api/wafers').send({
        materialId: material.id,
        cutNormal: [0, 0, 1],
        flatDirection: [1, -1, 0],
        diameterMm: 50.8,
        thicknessUm: 350,
        lot: `LOT-${uid()}`,
      })
      expect(res.status).toBe(201)
      ids.push(res.body.id)
    }
    for (const sort of ['status', 'material', 'diameterMm'])
      for (const dir of ['asc', 'desc'] as const) {
        const { rows, totals } = await allPages((page) =>
          listWafers(t.db, { ...first, page, sort, dir, materialId: material.id }),
        )
        expect(
          rows.map((r) => r.id),
          `${sort} ${dir}`,
        ).toEqual(ids)
        expect(totals).toEqual([3, 3, 3])
      }
    const byCode = await allPages((page) => listWafers(t.db, { ...first, page, dir: 'desc', materialId: material.id }))
    expect(byCode.rows.map((r) => r.id)).toEqual([...ids].reverse())
    for (const row of byCode.rows) expect(row).toEqual(await getWafer(t.db, row.id))
  })

  it('sessions: sorted pages of two, asc and desc (ties by id), with the filters applied and rows as the detail shows them', async () => {
    const sample = await makeSample(t.db, { arrays: [{}, {}] })
    const setup = await makeLaserSetup(t.db)
    const [a0, a1] = sample.arrays
    const made: { id: number; code: string }[] = []
    // the second and third share their performedAt: the tie is broken by id
    for (const [i, day] of ['2024-01-01', '2024-01-02', '2024-01-02', '2024-01-03', '2024-01-04'].entries()) {
      const res = await optics
        .post('/api/sessions')
        .send(sessionBody(setup.id, i === 2 ? [a1.id, a0.id] : [a0.id], { performedAt: `${day}T10:00:00.000Z` }))
      expect(res.status).toBe(201)
      made.push(res.body)
    }
    const codesUp = made.map((s) => s.code)
    const newestFirst = await allPages((page) => listSessions(t.db, { ...first, page, laserSetupId: setup.id }))
    expect(newestFirst.rows.map((r) => r.code)).toEqual([...codesUp].reverse())
    expect(newestFirst.totals).toEqual([5, 5, 5, 5])
    for (const sort of ['performedAt', 'code', 'wavelengthNm', 'harmonicOrder', 'createdAt'])
      for (const dir of ['asc', 'desc'] as const) {
        const { rows, totals } = await allPages((page) =>
          listSessions(t.db, { ...first, page, sort, dir, laserSetupId: setup.id }),
        )
        expect(
          rows.map((r) => r.code),
          `${sort} ${dir}`,
        ).toEqual(dir === 'asc' ? codesUp : [...codesUp].reverse())
        expect(totals).toEqual([5, 5, 5, 5])
      }
    const byArray = await allPages((page) => listSessions(t.db, { ...first, page, array: a1.code }))
    expect(byArray.rows.map((r) => r.code)).toEqual([made[2].code])
    expect(byArray.rows[0].arrayCodes).toEqual([a0.code, a1.code].sort())
    const inDays = await allPages((page) =>
      listSessions(t.db, { ...first, page, laserSetupId: setup.id, from: '2024-01-02', to: '2024-01-03' }),
    )
    expect(inDays.rows.map((r) => r.code)).toEqual([made[3].code, made[2].code, made[1].code])
    expect(inDays.totals).toEqual([3, 3, 3])
    for (const row of newestFirst.rows) {
      const s = await getSession(t.db, row.id)
      expect(row).toEqual({
        id: s.id,
        code: s.code,
        laserSetup: s.laserSetup,
        operator: s.operator,
        performedAt: s.performedAt,
        wavelengthNm: s.wavelengthNm,
        harmonicOrder: s.harmonicOrder,
        pump: s.pump,
        avgPowerMw: s.avgPowerMw,
        createdAt: s.createdAt,
        arrayCodes: s.results.map((r) => r.arrayCode),
        isBackdated: s.isBackdated,
      })
    }
  })
})
