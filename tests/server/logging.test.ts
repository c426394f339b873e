import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import request from 'supertest'
import { createApp } from '../../server/app'
import { createLogger } from '../../server/logger'
import { startTestApp, signedInAs } from './helpers'

/** An app of the test database whose logs are captured as parsed JSON lines. */
let t: Awaited<ReturnType<typeof startTestApp>>
const closers: (() => Promise<void>)[] = []
beforeAll(async () => {
  t = await startTestApp()
})
afterAll(async () => {
  for (const c of closers) await c()
  await t.stop()
})

type Line = {
  level: number
  msg: string
  reqId?: string
  userId?: number
  req?: { method: string; url: string; headers?: unknown }
  res?: { statusCode: number }
  err?: { message: string; stack: string }
}
function appLogging(level: string, db = t.db) {
  const lines: Line[] = []
  const log = createLogger(level, {
    write: (s: string) => {
      lines.push(JSON.parse(s))
    },
  })
  const { app, close } = createApp({ ...t.ctx, db, log })
  closers.push(close)
  return { app, lines }
}

describe('structured logs', () => {
  it('write one JSON line per request with its request id, method, URL, status and person, and no headers', async () => {
    const { app, lines } = appLogging('info')
    const res = await request(app).get('/api/auth/me').set('X-Request-Id', 'log-test-0001')
    expect(res.status).toBe(401)
    const line = lines.find((l) => l.reqId === 'log-test-0001')!
    expect(line).toMatchObject({
      level: 40,
      msg: 'GET /api/auth/me 401',
      req: { method: 'GET', url: '/api/auth/me' },
      res: { statusCode: 401 },
    })
    expect(line.req?.headers).toBeUndefined()
    const fab = await signedInAs(app, 'fab_technician')
    const me = await fab.get('/api/auth/me')
    const ok = lines.find((l) => l.reqId === me.headers['x-request-id'])!
    expect(ok).toMatchObject({ level: 30, userId: me.body.user.id, res: { statusCode: 200 } })
    expect(JSON.stringify(lines)).not.toMatch(/sid=|password/i)
  })

  it('log a failed request as an error with its stack under the id the client was given; at LOG_LEVEL=error nothing else', async () => {
    // Sign in on a working app, then use the cookie on one whose database calls fail.
    const fab = await signedInAs(t.app, 'fab_technician')
    const broken = new Proxy(
      {},
      {
        get: () => () => {
          throw new Error('boom in the data layer')
        },
      },
    )
    const { app, lines } = appLogging('error', broken as never)
    const cookie = (await fab.get('/api/auth/me')).request.cookies
    const res = await request(app).get('/api/auth/me').set('Cookie', cookie)
    expect(res.status).toBe(500)
    expect(res.body.requestId).toBeTruthy()
    const mine = lines.filter((l) => l.reqId === res.body.requestId)
    expect(mine.length).toBeGreaterThan(0)
    expect(mine.every((l) => l.level === 50)).toBe(true)
    expect(mine.some((l) => l.err?.stack.includes('boom in the data layer'))).toBe(true)
    expect(res.text).not.toContain('boom')
    const before = lines.length
    expect((await request(app).get('/api/auth/me')).status).toBe(401) // anonymous: no database call, a 4xx
    expect(lines.length).toBe(before)
  })
})
