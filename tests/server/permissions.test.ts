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
 * Every protected route and the roles that may use it (the product brief: admins and group leads
 * manage people; only admins read the mail outbox; every signed-in person searches and computes).
 * The bodies are deliberately empty or invalid, so an allowed call answers 2xx/400/404 and writes nothing.
 */
const MATRIX: { method: Method; path: string; body?: object; allowed: Role[] }[] = [
  { method: 'get', path: '/api/users', allowed: ['admin', 'group_lead'] },
  { method: 'post', path: '/api/users/invite', body: {}, allowed: ['admin', 'group_lead'] },
  { method: 'patch', path: '/api/users/999999', body: { name: 'Nobody Here' }, allowed: ['admin', 'group_lead'] },
  { method: 'get', path: '/api/mail', allowed: ['admin'] },
  { method: 'get', path: '/api/mail/queue', allowed: ['admin'] },
  { method: 'get', path: '/api/mail/999999', allowed: ['admin'] },
  { method: 'get', path: '/api/search?q=lab', allowed: EVERYONE },
  { method: 'post', path: '/api/channels', body: {}, allowed: EVERYONE },
  { method: 'get', path: '/api/auth/me', allowed: EVERYONE },
  { method: 'post', path: '/api/auth/password', body: {}, allowed: EVERYONE },
]

describe('route × role matrix', () => {
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
