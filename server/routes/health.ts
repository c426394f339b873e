import { Router } from 'express'
import type { AppContext } from '../context'
import type { HealthStatus } from '../../shared/types'

/** Liveness and database status; 503 when the database does not answer. */
export function healthRoutes(ctx: AppContext): Router {
  const r = Router()
  r.get('/', async (_req, res) => {
    let database: HealthStatus['database'] = 'up'
    try {
      await Promise.race([ctx.pool.query('SELECT 1'), new Promise((_, rej) => setTimeout(() => rej(new Error('timeout')), 2000))])
    } catch { database = 'down' }
    const mail = (await ctx.mailUp().catch(() => false)) ? 'up' : 'down'
    const body: HealthStatus = {
      status: database === 'up' ? 'ok' : 'degraded', database, mail,
      uptimeS: Math.round((Date.now() - ctx.startedAt) / 1000), version: process.env.npm_package_version ?? '0.1.0',
    }
    res.status(database === 'up' ? 200 : 503).json(body)
  })
  return r
}
