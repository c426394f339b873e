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

type Method = 'get' | 'post'
const EVERYONE = [...ROLES]
/** The analysis routes × roles: reading for everyone signed in; fits and spectra (which may save) for optics staff and admins. */
const MATRIX: { method: Method; path: string; body?: object; allowed: Role[] }[] = [
  { method: 'get', path: '/api/analysis/arrays/999999999/pattern', allowed: EVERYONE },
  { method: 'get', path: '/api/analysis/chips/999999999/pattern', allowed: EVERYONE },
  { method: 'post', path: '/api/analysis/pattern', body: {}, allowed: EVERYONE },
  { method: 'get', path: '/api/analysis/arrays/999999999/sheet', allowed: EVERYONE },
  { method: 'get', path: '/api/analysis/chips/999999999/sheet', allowed: EVERYONE },
  { method: 'get', path: '/api/analysis/sessions/999999999', allowed: EVERYONE },
  { method: 'post', path: '/api/analysis/sessions/999999999/fit', body: {}, allowed: ['admin', 'optics_staff'] },
  { method: 'post', path: '/api/analysis/sessions/999999999/spectrum', body: {}, allowed: ['admin', 'optics_staff'] },
]

describe('analysis routes × roles', () => {
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
