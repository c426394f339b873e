import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import express from 'express'
import request from 'supertest'
import fs from 'node:fs'
import os from 'node:os'
import path from 'node:path'
import http from 'node:http'
import type { AddressInfo } from 'node:net'
import { brotliDecompressSync, gunzipSync } from 'node:zlib'
import { clientFiles, IMMUTABLE } from '../../server/middleware/client-files'
import { precompress } from '../../scripts/precompress'

/** A tiny built client (the real one may not be built when Vitest runs), precompressed as the build does. */
let dir: string
let app: express.Express
const js = `export const greeting = ${JSON.stringify('hello, '.repeat(400))}\n`
const html = `<!doctype html><html><head><script type="module" src="/assets/index-AbC123xy.js"></script></head><body>${'<p>lab</p>'.repeat(100)}</body></html>`
beforeAll(() => {
  dir = fs.mkdtempSync(path.join(os.tmpdir(), 'overtone-client-'))
  fs.mkdirSync(path.join(dir, 'assets'))
  fs.writeFileSync(path.join(dir, 'index.html'), html)
  fs.writeFileSync(path.join(dir, 'assets', 'index-AbC123xy.js'), js)
  fs.writeFileSync(path.join(dir, 'assets', 'font-Zz99.woff2'), Buffer.from([0x77, 0x4f, 0x46, 0x32, 1, 2, 3]))
  expect(precompress(dir)).toBe(4) // .br and .gz of the JS and of index.html; not of the font
  app = express()
  app.use(clientFiles(dir))
})
afterAll(() => fs.rmSync(dir, { recursive: true, force: true }))

/** GET through plain node:http, which leaves the body as sent (supertest would undo the Content-Encoding). */
function raw(
  url: string,
  acceptEncoding: string,
): Promise<{ status: number; headers: http.IncomingHttpHeaders; body: Buffer }> {
  return new Promise((resolve, reject) => {
    const server = app.listen(0, '127.0.0.1', () => {
      const { port } = server.address() as AddressInfo
      http
        .get({ host: '127.0.0.1', port, path: url, headers: { 'accept-encoding': acceptEncoding } }, (res) => {
          const chunks: Buffer[] = []
          res.on('data', (c: Buffer) => chunks.push(c))
          res.on('end', () => {
            server.close()
            resolve({ status: res.statusCode!, headers: res.headers, body: Buffer.concat(chunks) })
          })
        })
        .on('error', (e) => {
          server.close()
          reject(e)
        })
    })
  })
}

describe('the built client', () => {
  it('sends a hashed asset brotli-compressed when the browser accepts br, cached as immutable', async () => {
    const res = await raw('/assets/index-AbC123xy.js', 'gzip, deflate, br')
    expect(res.status).toBe(200)
    expect(res.headers['content-encoding']).toBe('br')
    expect(res.headers['content-type']).toBe('text/javascript; charset=utf-8')
    expect(res.headers.vary).toMatch(/Accept-Encoding/)
    expect(res.headers['cache-control']).toBe(IMMUTABLE)
    expect(brotliDecompressSync(res.body).toString()).toBe(js)
    expect(res.body.length).toBeLessThan(js.length / 4)
  })

  it('sends gzip to a browser without br, and the plain file to one that accepts neither', async () => {
    const gz = await raw('/assets/index-AbC123xy.js', 'gzip')
    expect(gz.headers['content-encoding']).toBe('gzip')
    expect(gunzipSync(gz.body).toString()).toBe(js)
    const plain = await raw('/assets/index-AbC123xy.js', 'identity')
    expect(plain.headers['content-encoding']).toBeUndefined()
    expect(plain.body.toString()).toBe(js)
    expect(plain.headers.vary).toMatch(/Accept-Encoding/)
  })

  it('answers index.html, revalidated on every load, for the page and any client route; a missing asset is a 404', async () => {
    for (const url of ['/', '/inventory/arrays/12']) {
      const res = await raw(url, 'br')
      expect(res.status).toBe(200)
      expect(res.headers['cache-control']).toBe('no-cache')
      expect(res.headers['content-type']).toBe('text/html; charset=utf-8')
      expect(brotliDecompressSync(res.body).toString()).toBe(html)
    }
    expect((await request(app).get('/assets/gone-11111111.js')).status).toBe(404)
    const font = await request(app).get('/assets/font-Zz99.woff2').set('Accept-Encoding', 'br')
    expect([font.status, font.headers['content-encoding'], font.headers['cache-control']]).toEqual([
      200,
      undefined,
      IMMUTABLE,
    ])
    expect((await request(app).get('/assets/../index.html')).status).not.toBe(500)
  })
})
