import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import request from 'supertest'
import type TestAgent from 'supertest/lib/agent'
import { startTestApp, signedInAs } from './helpers'
import { listRoutes } from './route-list'

/**
 * Input that must be refused, never stored or crashed on: ids in paths, unknown ids, text with
 * control or bidirectional-override characters, deeply nested JSON bodies.
 */
let t: Awaited<ReturnType<typeof startTestApp>>
let admin: TestAgent
let officer: TestAgent
beforeAll(async () => {
  t = await startTestApp()
  admin = await signedInAs(t.app, 'admin')
  officer = await signedInAs(t.app, 'safety_officer')
})
afterAll(async () => {
  await t.stop()
})

const idRoutes = () =>
  listRoutes(t.app).filter(
    (r) => r.path.startsWith('/api') && /:id\b/.test(r.path) && !r.path.startsWith('/api/excel/exports'),
  )
type Send = Record<string, (u: string) => import('supertest').Test>
/** As the administrator; the sign-off routes (safety officers only, 403 for the administrator) as a safety officer. */
const call = (method: string, url: string) =>
  ((/\/(approve|reject|revoke)$/.test(url) ? officer : admin) as unknown as Send)[method.toLowerCase()](url)
const fill = (path: string, id: string) => path.replace(/:id\b/, encodeURIComponent(id)).replace(/:entity\b/, 'chip')

describe('ids in paths', () => {
  it('finds the routes with an id', () => {
    expect(idRoutes().length).toBeGreaterThan(30)
  })

  for (const bad of ['0x1', '1e0', ' 1', '1 ', '-1', '0', '1.0', '+1', '01', '1_0', '９', '99999999999999999999'])
    it(`refuses ${JSON.stringify(bad)} with a field message on every route`, async () => {
      const wrong: string[] = []
      for (const r of idRoutes()) {
        const res = await call(r.method, fill(r.path, bad)).send({})
        if (res.status !== 400 || !res.body.fields?.id)
          wrong.push(`${r.method} ${r.path} → ${res.status} ${JSON.stringify(res.body).slice(0, 120)}`)
      }
      expect(wrong).toEqual([])
    })

  it('refuses the same in ids in query strings', async () => {
    for (const [url, field] of [
      ['/api/audit/search?entityId=0x1', 'entityId'],
      ['/api/audit/search?userId=1e0', 'userId'],
      ['/api/wafers?materialId=1.0', 'materialId'],
      ['/api/sessions?laserSetupId=%201', 'laserSetupId'],
      ['/api/files?entity=chip&entityId=0x10', 'entityId'],
      ['/api/locations?parentId=-1', 'parentId'],
    ] as const) {
      const res = await admin.get(url)
      expect(res.status, url).toBe(400)
      expect(res.body.fields?.[field], url).toBeDefined()
    }
  })

  it('answers 404 for an unknown id on every read route', async () => {
    const wrong: string[] = []
    for (const r of idRoutes().filter((x) => x.method === 'GET')) {
      const res = await call('GET', fill(r.path, '999999'))
      if (res.status !== 404) wrong.push(`${r.method} ${r.path} → ${res.status}`)
    }
    expect(wrong).toEqual([])
  })

  it('never answers 2xx or 500 for an unknown id on a write route', async () => {
    const wrong: string[] = []
    for (const r of idRoutes().filter((x) => x.method !== 'GET')) {
      const res = await call(r.method, fill(r.path, '999999')).send({})
      if (res.status < 400 || res.status >= 500) wrong.push(`${r.method} ${r.path} → ${res.status}`)
    }
    expect(wrong).toEqual([])
  })
})

describe('text fields', () => {
  const uid = () => `${Date.now()}-${Math.floor(Math.random() * 1e6)}`
  const material = (over: Record<string, unknown>) =>
    admin.post('/api/materials').send({ name: `Text ${uid()}`, formula: 'GaAs', pointGroup: '-43m', ...over })

  for (const [label, bad] of [
    ['RIGHT-TO-LEFT OVERRIDE', 'abc\u202Etxt.exe'],
    ['LEFT-TO-RIGHT ISOLATE', 'a\u2066b'],
    ['POP DIRECTIONAL ISOLATE', 'a\u2069b'],
  ] as const)
    it(`refuses ${label} in a one-line field and in notes, with a field message`, async () => {
      const a = await material({ name: `N ${bad} ${uid()}` })
      expect(a.status).toBe(400)
      expect(a.body.fields.name[0]).toMatch(/text-direction/)
      const b = await material({ notes: `note ${bad}` })
      expect(b.status).toBe(400)
      expect(b.body.fields.notes[0]).toMatch(/text-direction/)
    })

  for (const [label, bad] of [
    ['NUL', 'a\u0000b'],
    ['BEL', 'a\u0007b'],
    ['ESC', 'a\u001b[31mb'],
    ['DEL', 'a\u007fb'],
    ['C1 CSI', 'a\u009bb'],
    ['tab', 'a\tb'],
    ['line feed', 'a\nb'],
  ] as const)
    it(`refuses ${label} in a one-line field`, async () => {
      const res = await material({ formula: bad })
      expect(res.status).toBe(400)
      expect(res.body.fields.formula[0]).toMatch(/one line/)
    })

  it('keeps tabs and line breaks in notes but refuses other control characters there', async () => {
    const ok = await material({ notes: 'line one\n\tline two\r\nline three' })
    expect(ok.status).toBe(201)
    expect(ok.body.notes).toBe('line one\n\tline two\r\nline three')
    const bad = await material({ notes: 'beep\u0007' })
    expect(bad.status).toBe(400)
    expect(bad.body.fields.notes[0]).toMatch(/control characters/)
  })

  it('refuses control characters in a retirement reason and a list search', async () => {
    const m = await material({})
    const r = await admin.post(`/api/materials/${m.body.id}/retire`).send({ reason: 'gone\u202E' })
    expect(r.status).toBe(400)
    expect(r.body.fields.reason).toBeDefined()
    const q = await admin.get('/api/wafers').query({ q: 'x\u0000' })
    expect(q.status).toBe(400)
    expect(q.body.fields.q).toBeDefined()
  })
})

describe('deeply nested JSON', () => {
  const deep = (n: number) => '['.repeat(n) + ']'.repeat(n)
  const deepObject = (n: number) => '{"a":'.repeat(n) + '1' + '}'.repeat(n)

  it('is refused with 400 on every route that takes a body (an array nested 5 000 deep, ~10 kB)', async () => {
    const wrong: string[] = []
    // (signing out is checked anonymously below, so the administrator stays signed in)
    for (const r of listRoutes(t.app).filter(
      (x) => x.path.startsWith('/api') && x.method !== 'GET' && x.path !== '/api/auth/logout',
    )) {
      const url = r.path.replace(/:id\b/, '1').replace(/:\w+/g, 'x')
      for (const body of [deep(5000), deepObject(5000), `{"notes": ${deep(5000)}}`]) {
        const res = await call(r.method, url).set('Content-Type', 'application/json').send(body)
        if (res.status !== 400 || !/nested/.test(res.body.message ?? ''))
          wrong.push(`${r.method} ${url} → ${res.status} ${JSON.stringify(res.body).slice(0, 100)}`)
      }
    }
    expect(wrong).toEqual([])
  })

  it('is refused for anonymous callers too, and brackets inside strings do not count', async () => {
    for (const url of ['/api/auth/login', '/api/auth/logout']) {
      const anon = await request(t.app).post(url).set('Content-Type', 'application/json').send(deep(5000))
      expect(anon.status).toBe(400)
      expect(anon.body.message).toMatch(/nested/)
    }
    const inString = await admin.post('/api/materials').send({
      name: `Brackets ${Date.now()}-${Math.floor(Math.random() * 1e6)} ${'['.repeat(50)}`,
      formula: 'GaAs',
      pointGroup: '-43m',
      notes: '{'.repeat(1500),
    })
    expect(inString.status).toBe(201)
  })
})
