import http from 'node:http'
import type { AddressInfo } from 'node:net'

/**
 * An in-process fake S3 endpoint for tests: path-style PUT/GET/HEAD/DELETE of one bucket's objects
 * in a Map, no signature check. `seen` lists every request that reached it.
 */
export interface Seen {
  method: string
  path: string
  authorization: string
  headers: http.IncomingHttpHeaders
}

export function fakeS3(bucketName: string) {
  const objects = new Map<string, { body: Buffer; meta: Record<string, string> }>()
  const seen: Seen[] = []
  const server = http.createServer(async (req, res) => {
    const chunks: Buffer[] = []
    for await (const c of req) chunks.push(c as Buffer)
    const url = new URL(req.url ?? '/', 'http://fake')
    seen.push({
      method: req.method ?? '',
      path: url.pathname,
      authorization: String(req.headers.authorization ?? ''),
      headers: req.headers,
    })
    const [, bucket, ...rest] = url.pathname.split('/')
    const key = decodeURIComponent(rest.join('/'))
    const xml = (status: number, code: string) => {
      res.writeHead(status, { 'content-type': 'application/xml' })
      res.end(
        req.method === 'HEAD'
          ? undefined
          : `<?xml version="1.0" encoding="UTF-8"?>\n<Error><Code>${code}</Code><Message>${code}</Message><Key>${key}</Key><RequestId>fake</RequestId></Error>`,
      )
    }
    if (bucket !== bucketName) return xml(404, 'NoSuchBucket')
    if (req.method === 'PUT') {
      const meta: Record<string, string> = {}
      for (const [h, v] of Object.entries(req.headers)) if (h.startsWith('x-amz-meta-')) meta[h] = String(v)
      meta['content-type'] = String(req.headers['content-type'] ?? '')
      objects.set(key, { body: Buffer.concat(chunks), meta })
      res.writeHead(200, { etag: '"fake"' })
      return res.end()
    }
    if (req.method === 'DELETE') {
      // As S3: 204 whether or not the key was there.
      objects.delete(key)
      res.writeHead(204)
      return res.end()
    }
    const obj = objects.get(key)
    if (req.method === 'GET' || req.method === 'HEAD') {
      if (!obj) return xml(404, 'NoSuchKey')
      res.writeHead(200, {
        'content-length': String(obj.body.length),
        'content-type': obj.meta['content-type'],
        etag: '"fake"',
      })
      return res.end(req.method === 'HEAD' ? undefined : obj.body)
    }
    xml(405, 'MethodNotAllowed')
  })
  return {
    server,
    objects,
    seen,
    /** Listen on a free loopback port; answers the endpoint URL. */
    async start(): Promise<string> {
      await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve))
      return `http://127.0.0.1:${(server.address() as AddressInfo).port}`
    },
    stop: () => new Promise<void>((resolve) => server.close(() => resolve())),
  }
}
