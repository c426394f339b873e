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
const FAB: Role[] = ['admin', 'fab_technician']
/**
 * The inventory routes × roles (shared/abilities.ts: every signed-in person reads lab records;
 * fab technicians and admins write materials, locations, wafers, chips, fab steps and arrays).
 * Bodies are empty or point at missing ids, so an allowed call answers 2xx/400/404 and writes nothing.
 */
const MATRIX: { method: Method; path: string; body?: object; allowed: Role[] }[] = [
  { method: 'get', path: '/api/materials', allowed: EVERYONE },
  { method: 'get', path: '/api/materials/999999', allowed: EVERYONE },
  { method: 'post', path: '/api/materials', body: {}, allowed: FAB },
  { method: 'patch', path: '/api/materials/999999', body: {}, allowed: FAB },
  { method: 'post', path: '/api/materials/999999/retire', body: { reason: 'x' }, allowed: FAB },
  { method: 'get', path: '/api/locations', allowed: EVERYONE },
  { method: 'get', path: '/api/locations/999999', allowed: EVERYONE },
  { method: 'post', path: '/api/locations', body: {}, allowed: FAB },
  { method: 'patch', path: '/api/locations/999999', body: {}, allowed: FAB },
  { method: 'post', path: '/api/locations/999999/retire', body: { reason: 'x' }, allowed: FAB },
  { method: 'get', path: '/api/moves?itemCode=W-0001', allowed: EVERYONE },
  { method: 'post', path: '/api/moves', body: {}, allowed: FAB },
  { method: 'get', path: '/api/wafers', allowed: EVERYONE },
  { method: 'get', path: '/api/wafers/999999', allowed: EVERYONE },
  { method: 'post', path: '/api/wafers', body: {}, allowed: FAB },
  { method: 'patch', path: '/api/wafers/999999', body: {}, allowed: FAB },
  { method: 'post', path: '/api/wafers/999999/retire', body: { reason: 'x' }, allowed: FAB },
  { method: 'post', path: '/api/wafers/999999/dice', body: {}, allowed: FAB },
  { method: 'get', path: '/api/chips', allowed: EVERYONE },
  { method: 'get', path: '/api/chips/999999', allowed: EVERYONE },
  { method: 'patch', path: '/api/chips/999999', body: { notes: 'x' }, allowed: FAB },
  { method: 'post', path: '/api/chips/999999/retire', body: { reason: 'x' }, allowed: FAB },
  { method: 'get', path: '/api/chips/999999/fab-steps', allowed: EVERYONE },
  { method: 'post', path: '/api/chips/999999/fab-steps', body: {}, allowed: FAB },
  { method: 'get', path: '/api/chips/999999/arrays', allowed: EVERYONE },
  { method: 'post', path: '/api/chips/999999/arrays', body: {}, allowed: FAB },
  { method: 'get', path: '/api/arrays', allowed: EVERYONE },
  { method: 'get', path: '/api/arrays/999999', allowed: EVERYONE },
  { method: 'post', path: '/api/arrays', body: {}, allowed: FAB },
  { method: 'patch', path: '/api/arrays/999999', body: {}, allowed: FAB },
  { method: 'post', path: '/api/arrays/999999/retire', body: { reason: 'x' }, allowed: FAB },
  { method: 'post', path: '/api/arrays/999999/recompute', allowed: FAB },
  { method: 'post', path: '/api/arrays/recompute', body: { ids: [999999] }, allowed: FAB },
  { method: 'get', path: '/api/resolve/W-99999', allowed: EVERYONE },
]

describe('inventory route × role matrix', () => {
  for (const route of MATRIX) {
    it(`${route.method.toUpperCase()} ${route.path}: anonymous gets 401`, async () => {
      const res = await request(t.app)[route.method](route.path).send(route.body)
      expect(res.status).toBe(401)
    })
    for (const role of ROLES) {
      const allowed = route.allowed.includes(role)
      it(`${route.method.toUpperCase()} ${route.path} as ${role}: ${allowed ? 'allowed' : '403'}`, async () => {
        const res = await agents[role][route.method](route.path).send(route.body)
        if (allowed) expect([200, 201, 204, 400, 404]).toContain(res.status)
        else expect(res.status).toBe(403)
        expect(res.headers['content-type']).toMatch(/json/)
      })
    }
  }
})
