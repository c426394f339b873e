import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import type TestAgent from 'supertest/lib/agent'
import { eq, desc } from 'drizzle-orm'
import { startTestApp, signedInAs } from '../helpers'
import { makeBox, makeChip, makeWafer } from '../inventory-helpers'
import { mailQueue, users } from '../../../server/db/schema/index'

let t: Awaited<ReturnType<typeof startTestApp>>
let fab: TestAgent
beforeAll(async () => {
  t = await startTestApp()
  fab = await signedInAs(t.app, 'fab_technician')
})
afterAll(async () => {
  await t.stop()
})

describe('locations and moves', () => {
  it('builds the tree with codes and paths; field-level 400s; 404', async () => {
    const { room, cab, box } = await makeBox(fab)
    expect(box.code).toMatch(/^L-\d{4}$/)
    expect(box.path).toBe(`${room.name} › Cabinet 1 › Box 1`)
    expect(
      (await fab.post('/api/locations').send({ kind: 'box', name: 'B', parentId: room.id })).body.fields.parentId[0],
    ).toMatch(/cabinet/)
    expect((await fab.post('/api/locations').send({ kind: 'slot', name: 'S' })).body.fields).toHaveProperty('parentId')
    expect((await fab.post('/api/locations').send({ kind: 'shelf', name: 'S' })).body.fields).toHaveProperty('kind')
    expect((await fab.get('/api/locations/999999')).status).toBe(404)
    const list = await fab.get(`/api/locations?parentId=${cab.id}`)
    expect(list.body.rows.map((l: { id: number }) => l.id)).toEqual([box.id])
    expect(
      (await fab.patch(`/api/locations/${box.id}`).send({ kind: 'box', name: 'Box 7', parentId: cab.id })).body.path,
    ).toMatch(/Box 7$/)
  })

  it('moves a chip and hands it over: location, holder, moves row, audit and a mail notice in one go', async () => {
    const { box } = await makeBox(fab)
    const { chip } = await makeChip(fab)
    const [optics] = await t.db.select().from(users).where(eq(users.email, 'optics@kestrel-lab.example'))
    const res = await fab
      .post('/api/moves')
      .send({ itemCode: chip.code.toLowerCase(), toLocationId: box.id, handToUserId: optics.id, note: 'for SHG maps' })
    expect(res.status).toBe(201)
    expect(res.body).toMatchObject({ itemCode: chip.code, to: { id: box.id }, handedTo: { id: optics.id }, from: null })
    const c = (await fab.get(`/api/chips/${chip.id}`)).body
    expect(c.location.id).toBe(box.id)
    expect(c.holder.id).toBe(optics.id)
    const [mail] = await t.db
      .select()
      .from(mailQueue)
      .where(eq(mailQueue.toAddress, optics.email))
      .orderBy(desc(mailQueue.id))
      .limit(1)
    expect(mail.subject).toContain(chip.code)
    const hist = await fab.get(`/api/moves?itemCode=${chip.code}`)
    expect(hist.body).toHaveLength(1)
  })

  it('moves a wafer and a box; refuses unknown codes and places; retire only when empty', async () => {
    const a = await makeBox(fab)
    const b = await makeBox(fab)
    const { wafer } = await makeWafer(fab)
    expect((await fab.post('/api/moves').send({ itemCode: wafer.code, toLocationId: a.box.id })).status).toBe(201)
    expect((await fab.post('/api/moves').send({ itemCode: a.box.code, toLocationId: b.cab.id })).body.to.id).toBe(
      b.cab.id,
    )
    expect((await fab.get(`/api/locations/${a.box.id}`)).body.path).toBe(`${b.room.name} › Cabinet 1 › Box 1`)
    expect(
      (await fab.post('/api/moves').send({ itemCode: 'W-99999', toLocationId: a.box.id })).body.fields,
    ).toHaveProperty('itemCode')
    expect((await fab.post('/api/moves').send({ itemCode: 'X-1', toLocationId: a.box.id })).body.fields).toHaveProperty(
      'itemCode',
    )
    expect(
      (await fab.post('/api/moves').send({ itemCode: wafer.code, toLocationId: 999999 })).body.fields,
    ).toHaveProperty('toLocationId')
    const full = await fab.post(`/api/locations/${a.box.id}/retire`).send({ reason: 'broken lid' })
    expect(full.status).toBe(400)
    expect((await fab.post(`/api/locations/${a.cab.id}/retire`).send({})).body.fields).toHaveProperty('reason')
    expect(
      (await fab.post(`/api/locations/${a.cab.id}/retire`).send({ reason: 'cabinet removed' })).body.retiredAt,
    ).not.toBeNull()
  })
})
