import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import request from 'supertest'
import type TestAgent from 'supertest/lib/agent'
import { eq, sql } from 'drizzle-orm'
import { startTestApp, signedInAs, demoEmail } from '../helpers'
import { makeWafer, uid } from '../inventory-helpers'
import { ROLES, type Role } from '../../../shared/roles'
import { auditLog, users } from '../../../server/db/schema/index'
import { writeAudit } from '../../../server/services/audit/audit'
import { auditRoutes } from '../../../server/routes/audit'

let t: Awaited<ReturnType<typeof startTestApp>>
const agents = {} as Record<Role, TestAgent>
beforeAll(async () => {
  t = await startTestApp()
  for (const role of ROLES) agents[role] = await signedInAs(t.app, role)
})
afterAll(async () => {
  await t.stop()
})

/** A wafer registered by the fab technician, then its notes changed once. */
async function editedWafer(notes = `scratch near the flat ${uid()}`) {
  const { wafer, material } = await makeWafer(agents.fab_technician)
  const body = {
    materialId: material.id,
    cutNormal: wafer.cutNormal,
    flatDirection: wafer.flatDirection,
    diameterMm: wafer.diameterMm,
    thicknessUm: wafer.thicknessUm,
    lot: wafer.lot,
    supplier: wafer.supplier,
    notes,
    reason: 'inspection',
  }
  const up = await agents.fab_technician.patch(`/api/wafers/${wafer.id}`).send(body)
  expect(up.status).toBe(200)
  return { wafer, notes }
}

describe('GET /api/audit/records/:entity/:id', () => {
  it('answers the history newest first, with names, field diffs and the reason', async () => {
    const { wafer, notes } = await editedWafer()
    const res = await agents.optics_staff.get(`/api/audit/records/wafer/${wafer.id}`)
    expect(res.status).toBe(200)
    expect(res.body.map((r: { action: string }) => r.action)).toEqual(['update', 'create'])
    const [upd, created] = res.body
    expect(upd).toMatchObject({
      entity: 'wafer',
      entityId: wafer.id,
      code: wafer.code,
      reason: 'inspection',
      user: { name: 'Tomasz Lindqvist' },
    })
    expect(upd.changes).toEqual({ notes: { from: null, to: notes } })
    expect(created.changes.code.to).toBe(wafer.code)
    expect(Date.parse(upd.at)).toBeGreaterThanOrEqual(Date.parse(created.at))
  })

  it('401 anonymous, 400 unknown kind or bad id, 403 when the kind is not readable, 404 for no such record', async () => {
    expect((await request(t.app).get('/api/audit/records/wafer/1')).status).toBe(401)
    const bad = await agents.admin.get('/api/audit/records/spaceship/1')
    expect(bad.status).toBe(400)
    expect(bad.body.fields).toHaveProperty('entity')
    expect((await agents.admin.get('/api/audit/records/wafer/abc')).status).toBe(400)
    expect((await agents.fab_technician.get('/api/audit/records/user/1')).status).toBe(403)
    expect((await agents.group_lead.get('/api/audit/records/user/1')).status).toBe(200)
    const none = await agents.fab_technician.get('/api/audit/records/wafer/999999999')
    expect(none.status).toBe(404)
    expect(none.body.message).toBe('No such record')
  })

  it('never shows password hashes or invitation tokens, at any depth', async () => {
    const [fab] = await t.db
      .select()
      .from(users)
      .where(eq(users.email, demoEmail('fab_technician')))
    const hash = fab.passwordHash!
    await writeAudit(t.db, {
      userId: null,
      entity: 'user',
      entityId: fab.id,
      action: 'other',
      changes: {
        passwordHash: { from: hash, to: 'scrypt$new-secret' },
        invitation: { from: null, to: { tokenHash: 'f00dfeed', token: 'raw-token-123', email: 'x@y' } },
        password: { from: '(hidden)', to: '(changed)' },
      },
    })
    const res = await agents.group_lead.get(`/api/audit/records/user/${fab.id}`)
    const text = JSON.stringify(res.body)
    for (const secret of [hash, 'scrypt$new-secret', 'f00dfeed', 'raw-token-123']) expect(text).not.toContain(secret)
    const row = res.body.find((r: { action: string }) => r.action === 'other')
    expect(row.changes.passwordHash).toEqual({ from: '(hidden)', to: '(hidden)' })
    expect(row.changes.invitation.to).toEqual({ tokenHash: '(hidden)', token: '(hidden)', email: 'x@y' })
    expect(row.changes.password).toEqual({ from: '(hidden)', to: '(changed)' })
  })
})

describe('GET /api/audit/search', () => {
  it('only group leads and admins may search (401 / 403 / 200)', async () => {
    expect((await request(t.app).get('/api/audit/search')).status).toBe(401)
    for (const role of ROLES) {
      const res = await agents[role].get('/api/audit/search?pageSize=1')
      expect([role, res.status]).toEqual([role, ['admin', 'group_lead'].includes(role) ? 200 : 403])
    }
  })

  it('filters by record code, kind + id, person, action, field name, reason and dates; pages and sorts', async () => {
    const { wafer } = await editedWafer()
    const lead = agents.group_lead
    const byCode = await lead.get(`/api/audit/search?code=${wafer.code.toLowerCase()}`)
    expect(byCode.body).toMatchObject({ total: 2, page: 1, pageSize: 25 })
    expect(byCode.body.rows[0]).toMatchObject({
      action: 'update',
      code: wafer.code,
      changes: { notes: { from: null } },
    })
    expect((await lead.get(`/api/audit/search?entity=wafer&entityId=${wafer.id}&action=create`)).body.total).toBe(1)
    const [fab] = await t.db
      .select()
      .from(users)
      .where(eq(users.email, demoEmail('fab_technician')))
    expect((await lead.get(`/api/audit/search?userId=${fab.id}&code=${wafer.code}`)).body.total).toBe(2)
    expect((await lead.get(`/api/audit/search?userId=${fab.id + 100000}&code=${wafer.code}`)).body.total).toBe(0)
    expect((await lead.get(`/api/audit/search?code=${wafer.code}&q=notes&action=update`)).body.total).toBe(1)
    expect((await lead.get(`/api/audit/search?code=${wafer.code}&q=thicknessUm&action=update`)).body.total).toBe(0)
    expect((await lead.get(`/api/audit/search?code=${wafer.code}&q=inspect`)).body.total).toBe(1)
    const today = new Date().toISOString().slice(0, 10)
    expect((await lead.get(`/api/audit/search?code=${wafer.code}&from=${today}&to=${today}`)).body.total).toBe(2)
    expect((await lead.get(`/api/audit/search?code=${wafer.code}&to=2000-01-01`)).body.total).toBe(0)
    expect((await lead.get(`/api/audit/search?code=${wafer.code}&from=2999-01-01T00:00:00Z`)).body.total).toBe(0)
    const paged = await lead.get(`/api/audit/search?code=${wafer.code}&pageSize=1&page=2&sort=at&dir=desc`)
    expect(paged.body).toMatchObject({ total: 2, page: 2, pageSize: 1 })
    expect(paged.body.rows[0].action).toBe('create')
    expect((await lead.get(`/api/audit/search?code=${wafer.code}&sort=action&dir=asc`)).body.rows[0].action).toBe(
      'create',
    )
    expect((await lead.get('/api/audit/search?sort=user&dir=asc&pageSize=3')).status).toBe(200)
  })

  it('field-level 400s: unknown code, code of another kind, bad kind / action / dates / sort', async () => {
    const lead = agents.group_lead
    expect((await lead.get('/api/audit/search?code=W-99999999')).body.fields).toHaveProperty('code')
    const { wafer } = await makeWafer(agents.fab_technician)
    expect((await lead.get(`/api/audit/search?code=${wafer.code}&entity=chip`)).body.fields).toHaveProperty('code')
    expect((await lead.get('/api/audit/search?entity=spaceship')).body.fields).toHaveProperty('entity')
    expect((await lead.get('/api/audit/search?action=erase')).body.fields).toHaveProperty('action')
    expect((await lead.get('/api/audit/search?from=yesterday')).body.fields).toHaveProperty('from')
    expect((await lead.get('/api/audit/search?from=2024-02-01&to=2024-01-01')).body.fields).toHaveProperty('to')
    expect((await lead.get('/api/audit/search?sort=password')).status).toBe(400)
  })
})

describe('the audit trail is append-only', () => {
  type Layer = {
    route?: { path: string; methods: Record<string, boolean> }
    handle?: { stack?: Layer[] }
    match?: (p: string) => boolean
  }
  function methodsUnder(stack: Layer[], probe: string): string[] {
    const out: string[] = []
    for (const l of stack) {
      if (l.route) out.push(...Object.keys(l.route.methods).map((m) => `${m} ${l.route!.path}`))
      else if (l.handle?.stack && (!l.match || l.match(probe))) out.push(...methodsUnder(l.handle.stack, probe))
    }
    return out
  }

  it('the audit router has GET routes only', () => {
    const router = auditRoutes(t.ctx) as unknown as { stack: Layer[] }
    const routes = methodsUnder(router.stack, '/')
    expect(routes.length).toBeGreaterThan(0)
    expect(routes.filter((r) => !r.startsWith('get '))).toEqual([])
  })

  it('no router mounted under /api/audit answers PATCH / PUT / DELETE / POST', async () => {
    const app = t.app as unknown as { router: { stack: Layer[] } }
    // routers mounted at /api/audit itself (not the /api-wide ones, which the HTTP probes below cover)
    const onlyAudit = app.router.stack.filter(
      (l) => l.handle?.stack && l.match?.('/api/audit/search') && !l.match?.('/api/not-audit'),
    )
    expect(onlyAudit.length).toBe(1)
    expect(methodsUnder(onlyAudit, '/api/audit/search').filter((r) => !r.startsWith('get '))).toEqual([])
    for (const method of ['patch', 'put', 'delete', 'post'] as const) {
      for (const path of ['/api/audit/records/wafer/1', '/api/audit/search', '/api/audit/1']) {
        expect([method, path, (await agents.admin[method](path).send({ reason: 'x' })).status]).toEqual([
          method,
          path,
          404,
        ])
      }
    }
  })

  it('the database refuses UPDATE and DELETE on audit_log, even through SQL', async () => {
    const [row] = await t.db
      .select({ id: auditLog.id, reason: auditLog.reason })
      .from(auditLog)
      .orderBy(sql`${auditLog.id} desc`)
      .limit(1)
    const failure = (q: Promise<unknown>) =>
      q.then(
        () => 'no error',
        (e: Error & { cause?: Error }) => `${e.message} ${e.cause?.message ?? ''}`,
      )
    expect(await failure(t.db.execute(sql`UPDATE audit_log SET reason = 'tampered' WHERE id = ${row.id}`))).toMatch(
      /append-only/,
    )
    expect(await failure(t.db.execute(sql`DELETE FROM audit_log WHERE id = ${row.id}`))).toMatch(/append-only/)
    const [after] = await t.db.select({ reason: auditLog.reason }).from(auditLog).where(eq(auditLog.id, row.id))
    expect(after.reason).toBe(row.reason)
  })
})
