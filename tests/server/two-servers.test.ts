import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import request from 'supertest'
import type TestAgent from 'supertest/lib/agent'
import { startTestApp, signedInAs, createPerson } from './helpers'
import { disk, makeChip, uid } from './inventory-helpers'
import { eq } from 'drizzle-orm'
import { DEMO_PASSWORD } from '../../server/db/seed/people'
import { users } from '../../server/db/schema/index'

/**
 * Two app servers on one database (as behind a load balancer): what one writes, the other shows on
 * its very next request, and a person changed on one is treated as changed by the other at once.
 */
let a: Awaited<ReturnType<typeof startTestApp>>
let b: Awaited<ReturnType<typeof startTestApp>>
let fabA: TestAgent, fabB: TestAgent
beforeAll(async () => {
  a = await startTestApp()
  b = await startTestApp()
  fabA = await signedInAs(a.app, 'fab_technician')
  fabB = await signedInAs(b.app, 'fab_technician')
})
afterAll(async () => {
  await a.stop()
  await b.stop()
})

describe('two app servers', () => {
  it('show a list and a detail page written through the other server on the next request', async () => {
    const { chip } = await makeChip(fabA)
    const url = `/api/arrays?chipId=${chip.id}`
    expect((await fabB.get(url)).body.rows).toHaveLength(0)
    expect((await fabB.get(url)).body.rows).toHaveLength(0)
    const created = await fabA.post('/api/arrays').send({ ...disk(chip.id, 'B2'), notes: `two servers ${uid()}` })
    expect(created.status).toBe(201)
    expect((await fabB.get(url)).body.rows.map((r: { id: number }) => r.id)).toEqual([created.body.id])
    const detail = `/api/arrays/${created.body.id}`
    expect((await fabB.get(detail)).status).toBe(200)
    const notes = `edited ${uid()}`
    expect((await fabA.patch(detail).send({ ...disk(chip.id, 'B2'), notes })).status).toBe(200)
    expect((await fabB.get(detail)).body.notes).toBe(notes)
  })

  it('refuse a person deactivated elsewhere on the very next request, and use changed roles at once', async () => {
    const person = await createPerson(a.db, ['fab_technician'], 'two-servers')
    const onB = request.agent(b.app)
    expect((await onB.post('/api/auth/login').send({ email: person.email, password: DEMO_PASSWORD })).status).toBe(200)
    expect((await onB.get('/api/auth/me')).status).toBe(200)
    // Fab technicians may not search the audit trail; group leads may. The row is changed straight in
    // the database, as an app server in another process would: nothing in this process hears of it.
    expect((await onB.get('/api/audit/search')).status).toBe(403)
    await a.db
      .update(users)
      .set({ roles: ['fab_technician', 'group_lead'] })
      .where(eq(users.id, person.id))
    expect((await onB.get('/api/audit/search')).status).toBe(200)
    await a.db.update(users).set({ active: false }).where(eq(users.id, person.id))
    expect((await onB.get('/api/auth/me')).status).toBe(401)
  })
})
