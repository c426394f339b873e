import express, { type RequestHandler, type Response } from 'express'
import fs from 'node:fs'
import path from 'node:path'

/**
 * The built client (dist/client): files under /assets carry a content hash in their names and are
 * cached for a year as immutable; index.html is revalidated on every load (`no-cache`), so a new
 * build is picked up at once. Text files have brotli and gzip copies made at build time
 * (scripts/precompress.ts): the best one the browser accepts is sent with its Content-Encoding,
 * and `Vary: Accept-Encoding` tells caches that the answer depends on that header. Any other GET
 * that is not an API route gets index.html (the client's router takes it from there).
 */
const ENCODINGS = [
  ['br', '.br'],
  ['gzip', '.gz'],
] as const
type Encoding = (typeof ENCODINGS)[number][0]

const TYPES: Record<string, string> = {
  '.js': 'text/javascript; charset=utf-8',
  '.mjs': 'text/javascript; charset=utf-8',
  '.css': 'text/css; charset=utf-8',
  '.html': 'text/html; charset=utf-8',
  '.svg': 'image/svg+xml',
  '.json': 'application/json; charset=utf-8',
  '.txt': 'text/plain; charset=utf-8',
}

export const IMMUTABLE = 'public, max-age=31536000, immutable'

/**
 * `/assets/x.js` → the encodings it has a precompressed copy in; read once, the build does not change under a running
 * server.
 */
function findVariants(dir: string): Map<string, Set<Encoding>> {
  const found = new Map<string, Set<Encoding>>()
  const walk = (sub: string) => {
    for (const entry of fs.readdirSync(path.join(dir, sub), { withFileTypes: true })) {
      const rel = `${sub}/${entry.name}`
      if (entry.isDirectory()) {
        walk(rel)
        continue
      }
      for (const [encoding, ext] of ENCODINGS) {
        if (!rel.endsWith(ext)) continue
        const original = rel.slice(0, -ext.length)
        if (!found.has(original)) found.set(original, new Set())
        found.get(original)!.add(encoding)
      }
    }
  }
  if (fs.existsSync(dir)) walk('')
  return found
}

function cacheControl(rel: string): string {
  if (rel.startsWith('/assets/')) return IMMUTABLE
  return rel === '/index.html' ? 'no-cache' : 'public, max-age=3600'
}

export function clientFiles(dir: string): RequestHandler {
  const variants = findVariants(dir)
  const setHeaders = (res: Response, file: string) => {
    const ext = ENCODINGS.find(([, e]) => file.endsWith(e))
    const original = ext ? file.slice(0, -ext[1].length) : file
    const rel = '/' + path.relative(dir, original).split(path.sep).join('/')
    res.setHeader('Cache-Control', cacheControl(rel))
    if (variants.has(rel)) res.setHeader('Vary', 'Accept-Encoding')
    if (ext) {
      res.setHeader('Content-Encoding', ext[0])
      res.setHeader('Content-Type', TYPES[path.extname(original)] ?? 'application/octet-stream')
    }
  }
  const serve = express.static(dir, { index: false, redirect: false, setHeaders })

  /** Serve `rel` (a file of the client), in the best encoding the request accepts. */
  const send: (rel: string) => RequestHandler = (rel) => (req, res, next) => {
    const has = variants.get(rel)
    // Our order (brotli is smaller), among what the request accepts (q > 0).
    const ext = has ? (ENCODINGS.find(([e]) => has.has(e) && req.acceptsEncodings(e) === e)?.[1] ?? '') : ''
    const url = req.url
    req.url = encodeURI(rel + ext)
    serve(req, res, (err?: unknown) => {
      req.url = url
      next(err)
    })
  }
  const isFile = (rel: string) => {
    try {
      return fs.statSync(path.join(dir, rel)).isFile()
    } catch {
      return false
    }
  }

  return (req, res, next) => {
    if (req.method !== 'GET' && req.method !== 'HEAD') return next()
    let rel: string
    try {
      rel = decodeURIComponent(req.path)
    } catch {
      return next()
    }
    if (rel.includes('\0') || rel.split('/').includes('..')) return next()
    if (rel !== '/index.html' && isFile(rel)) return send(rel)(req, res, next)
    if (rel.startsWith('/assets/')) return next() // a missing hashed file is a 404, not the page
    if (!isFile('/index.html')) {
      res.status(503).type('text').send('The client is not built yet: run `npm start` (or `npm run build`).')
      return
    }
    send('/index.html')(req, res, next)
  }
}
