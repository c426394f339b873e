import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import request from 'supertest'
import type TestAgent from 'supertest/lib/agent'
import { startTestApp, signedInAs } from './helpers'
import { ROLES, type Role } from '../../shared/roles'

export type MatrixMethod = 'get' | 'post' | 'patch'
/** One route and the roles that may use it; the body should be empty or point at a missing id. */
export interface MatrixRoute {
  method: MatrixMethod
  path: string
  body?: object
  allowed: Role[]
}
export const EVERYONE: Role[] = [...ROLES]

/**
 * The route × role suite every area uses: anonymous gets 401, a role outside `allowed` gets 403,
 * an allowed role gets one of `okStatuses` (the bodies are chosen so nothing is written), and every
 * answer is JSON. Starts its own app instance and signs in once per demo role.
 */
export function describeRoleMatrix(title: string, routes: MatrixRoute[], okStatuses = [200, 201, 204, 400, 404]): void {
  let t: Awaited<ReturnType<typeof startTestApp>>
  const agents = {} as Record<Role, TestAgent>
  beforeAll(async () => {
    t = await startTestApp()
    for (const role of ROLES) agents[role] = await signedInAs(t.app, role)
  })
  afterAll(async () => {
    await t.stop()
  })

  describe(title, () => {
    for (const route of routes) {
      const name = `${route.method.toUpperCase()} ${route.path}`
      it(`${name}: anonymous gets 401`, async () => {
        const res = await request(t.app)[route.method](route.path).send(route.body)
        expect(res.status).toBe(401)
      })
      for (const role of ROLES) {
        const allowed = route.allowed.includes(role)
        it(`${name} as ${role}: ${allowed ? 'allowed' : '403'}`, async () => {
          const res = await agents[role][route.method](route.path).send(route.body)
          if (allowed) expect(okStatuses).toContain(res.status)
          else expect(res.status).toBe(403)
          expect(res.headers['content-type']).toMatch(/json/)
        })
      }
    }
  })
}
