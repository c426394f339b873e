import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import request from 'supertest'
import type TestAgent from 'supertest/lib/agent'
import { startTestApp, signedInAs } from './helpers'
import { ROLES, type Role } from '../../shared/roles'

let t: Awaited<ReturnType<typeof startTestApp>>
const agents = {} as Record<Role, TestAgent>
beforeAll(async () => {
  t = await startTestApp()
  for (const role of ROLES) agents[role] = await signedInAs(t.app, role)
})
afterAll(async () => { await t.stop() })

type Method = 'get' | 'post' | 'patch'
const EVERYONE = [...ROLES]
/**
 * The measurement routes and who may use them (shared/abilities.ts: safety officers write laser
 * setups, optics staff write sessions, fab technicians and optics staff upload files, admins
 * manage all, everyone signed in reads). Bodies are empty or point at missing ids, so allowed
 * calls answer 200/400/404 and write nothing.
 */
const MATRIX: { method: Method; path: string; body?: object; allowed: Role[] }[] = [
  { method: 'get', path: '/api/laser-setups', allowed: EVERYONE },
  { method: 'get', path: '/api/laser-setups/999999999', allowed: EVERYONE },
  { method: 'post', path: '/api/laser-setups', body: {}, allowed: ['admin', 'safety_officer'] },
  { method: 'patch', path: '/api/laser-setups/999999999', body: {}, allowed: ['admin', 'safety_officer'] },
  { method: 'post', path: '/api/laser-setups/999999999/retire', body: {}, allowed: ['admin', 'safety_officer'] },
  { method: 'get', path: '/api/laser-setups/queue', allowed: ['admin', 'safety_officer'] },
  { method: 'post', path: '/api/laser-setups/999999999/approve', body: {}, allowed: ['admin', 'safety_officer'] },
  { method: 'post', path: '/api/laser-setups/999999999/reject', body: {}, allowed: ['admin', 'safety_officer'] },
  { method: 'post', path: '/api/laser-setups/999999999/revoke', body: {}, allowed: ['admin', 'safety_officer'] },
  { method: 'get', path: '/api/sessions', allowed: EVERYONE },
  { method: 'get', path: '/api/sessions/999999999', allowed: EVERYONE },
  { method: 'post', path: '/api/sessions/preview', body: {}, allowed: EVERYONE },
  { method: 'post', path: '/api/sessions', body: {}, allowed: ['admin', 'optics_staff'] },
  { method: 'patch', path: '/api/sessions/999999999', body: {}, allowed: ['admin', 'optics_staff'] },
  { method: 'get', path: '/api/files?entity=chip&entityId=999999999', allowed: EVERYONE },
  { method: 'get', path: '/api/files/999999999', allowed: EVERYONE },
  { method: 'get', path: '/api/files/999999999/download', allowed: EVERYONE },
  { method: 'get', path: '/api/files/999999999/preview', allowed: EVERYONE },
  { method: 'post', path: '/api/files', body: {}, allowed: ['admin', 'fab_technician', 'optics_staff'] },
  { method: 'post', path: '/api/files/999999999/retire', body: {}, allowed: ['admin', 'fab_technician', 'optics_staff'] },
]

describe('measurement routes × roles', () => {
  for (const route of MATRIX) {
    it(`${route.method.toUpperCase()} ${route.path}: anonymous gets 401`, async () => {
      const res = await request(t.app)[route.method](route.path).send(route.body)
      expect(res.status).toBe(401)
    })
    for (const role of ROLES) {
      const allowed = route.allowed.includes(role)
      it(`${route.method.toUpperCase()} ${route.path} as ${role}: ${allowed ? 'allowed' : '403'}`, async () => {
        const res = await agents[role][route.method](route.path).send(route.body)
        if (allowed) expect([200, 400, 404]).toContain(res.status)
        else expect(res.status).toBe(403)
        expect(res.headers['content-type']).toMatch(/json/)
      })
    }
  }
})
