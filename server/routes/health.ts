import { Router } from 'express'
import type { AppContext } from '../context'
import type { HealthStatus } from '../../shared/types'
import { dbMonitorOf } from '../middleware/db-watchdog'
import { createFileStorage } from '../services/files/create-storage'
import { storageFailure } from '../services/files/storage'

/**
 * Liveness, database, mail and file-storage status. 503 when the database does not answer (nothing
 * works without it); storage that cannot be written (read-only, full) makes the status "degraded"
 * with 200, since reading still works.
 */
export function healthRoutes(ctx: AppContext): Router {
  const r = Router()
  const files = createFileStorage(ctx.env.DATA_DIR, ctx.env)
  r.get('/', async (_req, res) => {
    const [isDbUp, isMailUp, storageProblem] = await Promise.all([
      dbMonitorOf(ctx.pool).isUp(0),
      ctx.mailUp().catch(() => false),
      files.checkWritable
        ? files.checkWritable().then(
            () => null,
            (err: unknown) => storageFailure(err).message,
          )
        : null,
    ])
    const problems = [...(isDbUp ? [] : ['The database does not answer.']), ...(storageProblem ? [storageProblem] : [])]
    const body: HealthStatus = {
      status: problems.length ? 'degraded' : 'ok',
      database: isDbUp ? 'up' : 'down',
      mail: isMailUp ? 'up' : 'down',
      storage: storageProblem ? 'down' : 'up',
      ...(problems.length ? { message: problems.join(' ') } : {}),
      uptimeS: Math.round((Date.now() - ctx.startedAt) / 1000),
      version: process.env.npm_package_version ?? '0.1.0',
    }
    res
      .status(isDbUp ? 200 : 503)
      .set('Cache-Control', 'no-store')
      .json(body)
  })
  return r
}
