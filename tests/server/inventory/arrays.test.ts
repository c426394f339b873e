import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import type TestAgent from 'supertest/lib/agent'
import { startTestApp, signedInAs } from '../helpers'
import { disk, makeChip } from '../inventory-helpers'
import { ENGINE_VERSION } from '../../../shared/engine'
import { eq } from 'drizzle-orm'
import { arrays } from '../../../server/db/schema/index'

let t: Awaited<ReturnType<typeof startTestApp>>
let fab: TestAgent
beforeAll(async () => {
  t = await startTestApp()
  fab = await signedInAs(t.app, 'fab_technician')
})
afterAll(async () => {
  await t.stop()
})

type Ch = {
  order: number
  pumpKey: string
  result: { m: number[]; normalEmission: { allowed: boolean; m: number[]; handedness?: string[] }; explain: string[] }
}
const channel = (a: { channels: Ch[] }, order: number, key: string) =>
  a.channels.find((c) => c.order === order && c.pumpKey === key)!

describe('arrays', () => {
  it('stores channels: disk array on GaAs (001), circular +1, order 2 → m ∈ {0, 4}, nothing along the normal', async () => {
    // Common practice: (001) zincblende has Q = {±2}; a C∞v structure passes m = 2 + q (Bhagavantam-type selection
    // rule).
    const { chip } = await makeChip(fab)
    const res = await fab
      .post('/api/arrays')
      .send({ ...disk(chip.id), lattice: 'single', periodXNm: null, periodYNm: null })
    expect(res.status).toBe(201)
    expect(res.body.code).toBe(`A-${chip.code.slice(2)}-A1`)
    expect(res.body.symmetry.name).toBe('C∞v')
    expect(res.body.channels).toHaveLength(8)
    expect(res.body.engineVersion).toBe(ENGINE_VERSION)
    expect(res.body.isStale).toBe(false)
    const c = channel(res.body, 2, 'circular+1')
    expect(c.result.m).toEqual([0, 4])
    expect(c.result.normalEmission.allowed).toBe(false)
    expect(c.result.explain[0]).toMatch(/lab x = primary flat/)
  })

  it('C3 triangle array on GaAs (111) allows counter-rotating SH along the normal (Q = {0, ±3} on (111))', async () => {
    const { chip } = await makeChip(fab, {}, { cutNormal: [1, 1, 1], flatDirection: [1, -1, 0] })
    const res = await fab
      .post(`/api/chips/${chip.id}/arrays`)
      .send({ position: 'B2', shape: 'triangle', dimensionsNm: { sideNm: 500 }, lattice: 'hexagonal', periodXNm: 950 })
    expect(res.status).toBe(201)
    expect(res.body.symmetry.name).toBe('C3v')
    const c = channel(res.body, 2, 'circular+1')
    expect(c.result.normalEmission.allowed).toBe(true)
    expect(c.result.normalEmission.m).toEqual([-1])
    expect(c.result.normalEmission.handedness).toEqual(['counter-rotating'])
  })

  it('centrosymmetric material: order 2 uses the surface χ(2) and says so', async () => {
    const { chip } = await makeChip(fab, {}, {}, { pointGroup: 'm-3m', coefficients: [] })
    const res = await fab.post('/api/arrays').send(disk(chip.id))
    expect(channel(res.body, 2, 'circular+1').result.explain.join(' ')).toMatch(/centrosymmetric.*surface/)
  })

  it('stale after a chip rotation change, cleared by recompute; filters and 400s', async () => {
    const { chip } = await makeChip(fab)
    const a = (await fab.post('/api/arrays').send({ ...disk(chip.id), shape: 'square', dimensionsNm: { sideNm: 400 } }))
      .body
    expect(a.symmetry.mirrors).toEqual([0, 45, 90, 135])
    await fab.patch(`/api/chips/${chip.id}`).send({ rotationDeg: 30, reason: 'test' })
    expect((await fab.get(`/api/arrays/${a.id}`)).body.isStale).toBe(true)
    const stale = await fab.get(`/api/arrays?chipId=${chip.id}&stale=true`)
    expect(stale.body.total).toBe(1)
    // the list row, the chip's arrays and the record page agree (one definition of stale)
    expect(
      (await fab.get(`/api/arrays?chipId=${chip.id}`)).body.rows.map((x: { isStale: boolean }) => x.isStale),
    ).toEqual([true])
    expect((await fab.get(`/api/chips/${chip.id}`)).body.arrays.map((x: { isStale: boolean }) => x.isStale)).toEqual([
      true,
    ])
    const r = await fab.post(`/api/arrays/${a.id}/recompute`)
    expect(r.body.isStale).toBe(false)
    expect(r.body.symmetry.mirrors).toEqual([30, 75, 120, 165])
    expect((await fab.get(`/api/arrays?chipId=${chip.id}&stale=true`)).body.total).toBe(0)
    await fab.patch(`/api/chips/${chip.id}`).send({ rotationDeg: 0, reason: 'back' })
    const batch = await fab.post('/api/arrays/recompute').send({ ids: [a.id], staleOnly: true })
    expect(batch.body).toEqual({ checked: 1, recomputed: 1 })
    expect((await fab.get(`/api/arrays?chipId=${chip.id}&shape=square&lattice=square`)).body.rows[0].isStale).toBe(
      false,
    )
    expect((await fab.post('/api/arrays').send(disk(chip.id, 'B4'))).status).toBe(201)
    expect((await fab.post('/api/arrays').send(disk(chip.id, 'B4'))).body.fields).toHaveProperty('position')
    expect((await fab.post('/api/arrays').send({ ...disk(chip.id, 'C3'), shape: 'blob' })).body.fields).toHaveProperty(
      'shape',
    )
    expect((await fab.post('/api/arrays').send(disk(999999))).body.fields).toHaveProperty('chipId')
    expect((await fab.get('/api/arrays/999999')).status).toBe(404)
  })

  it('update derives again; position is fixed; retire needs a reason', async () => {
    const { chip } = await makeChip(fab)
    const a = (await fab.post('/api/arrays').send(disk(chip.id))).body
    const up = await fab
      .patch(`/api/arrays/${a.id}`)
      .send({ ...disk(chip.id), shape: 'gammadion', dimensionsNm: { armLengthNm: 500, armWidthNm: 120 } })
    expect(up.body.symmetry.name).toBe('C4')
    expect((await fab.patch(`/api/arrays/${a.id}`).send(disk(chip.id, 'B1'))).body.fields).toHaveProperty('position')
    expect((await fab.post(`/api/arrays/${a.id}/retire`).send({})).body.fields).toHaveProperty('reason')
    expect(
      (await fab.post(`/api/arrays/${a.id}/retire`).send({ reason: 'resist peeled' })).body.retiredAt,
    ).not.toBeNull()
  })

  it('stores each distinct channel set once: two arrays of one design share a row; a recompute that changes the result points at a new row', async () => {
    const { chip } = await makeChip(fab)
    const setOf = async (id: number) => {
      const [[row]] = (await t.pool.query('SELECT channel_set_key AS k FROM arrays WHERE id = ?', [id])) as unknown as [
        [{ k: string }],
      ]
      return row.k
    }
    const sets = async () =>
      Number(((await t.pool.query('SELECT COUNT(*) AS n FROM channel_sets')) as unknown as [[{ n: number }]])[0][0].n)
    const a = (await fab.post('/api/arrays').send(disk(chip.id, 'A1'))).body
    const before = await sets()
    const b = (await fab.post('/api/arrays').send({ ...disk(chip.id, 'A2'), dimensionsNm: { diameterNm: 300 } })).body
    expect(await sets()).toBe(before)
    expect(await setOf(b.id)).toBe(await setOf(a.id))
    expect(b.channels).toEqual(a.channels)
    // A list row carries no channel JSON, only whether it is stale.
    const list = (await fab.get(`/api/arrays?chipId=${chip.id}`)).body.rows
    expect(list).toHaveLength(2)
    expect(list[0]).not.toHaveProperty('channels')
    // A new azimuth changes the structure's mirrors and the frame notes: a new set, the old one stays for A1.
    const turned = (await fab.patch(`/api/arrays/${b.id}`).send({ ...disk(chip.id, 'A2'), azimuthDeg: 15 })).body
    expect(await setOf(b.id)).not.toBe(await setOf(a.id))
    expect(turned.channels).toHaveLength(8)
    expect((await fab.get(`/api/arrays/${a.id}`)).body.channels).toEqual(a.channels)
  })
})

describe('arrays that cannot exist', () => {
  it('are refused with a message on the field to fix, and nothing is stored', async () => {
    const { chip } = await makeChip(fab)
    const ring = await fab.post('/api/arrays').send({
      chipId: chip.id,
      position: 'Z9',
      shape: 'ring',
      dimensionsNm: { innerDiameterNm: 450, outerDiameterNm: 300 },
      lattice: 'square',
      periodXNm: 600,
    })
    expect(ring.status).toBe(400)
    expect(ring.body.fields['dimensionsNm.innerDiameterNm'][0]).toMatch(/smaller than the outer one/)
    const crowded = await fab.post('/api/arrays').send({
      chipId: chip.id,
      position: 'Z9',
      shape: 'disk',
      dimensionsNm: { diameterNm: 500 },
      lattice: 'hexagonal',
      periodXNm: 450,
    })
    expect(crowded.body.fields.periodXNm[0]).toMatch(/neighbours overlap/)
    const mirrors = await fab.post('/api/arrays').send({
      chipId: chip.id,
      position: 'Z9',
      shape: 'custom',
      lattice: 'single',
      customRotationOrder: 4,
      customMirrors: [0, 30],
    })
    expect(mirrors.body.fields.customMirrors[0]).toMatch(/4-fold structure has no mirror lines or exactly 4/)
    expect(await t.db.select().from(arrays).where(eq(arrays.chipId, chip.id))).toEqual([])
  })
})
