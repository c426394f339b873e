import type { Express } from 'express'

export interface RouteRef {
  method: string
  path: string
}
type Layer = {
  route?: { path: string; methods: Record<string, boolean> }
  handle?: { stack?: Layer[] }
  rawPath?: string
}

/** Every route of the app, read from Express's router stack (a new route is covered without editing a test). */
export function listRoutes(app: Express): RouteRef[] {
  const out: RouteRef[] = []
  const walk = (stack: Layer[], prefix: string) => {
    for (const l of stack) {
      if (l.route)
        for (const m of Object.keys(l.route.methods))
          out.push({ method: m.toUpperCase(), path: (prefix + l.route.path).replace(/\/\/+/g, '/') })
      else if (l.handle?.stack)
        walk(l.handle.stack, prefix + (typeof l.rawPath === 'string' && l.rawPath !== '/' ? l.rawPath : ''))
    }
  }
  walk((app as unknown as { router: { stack: Layer[] } }).router.stack, '')
  return out
}
