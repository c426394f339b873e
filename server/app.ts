import { setExportStaleness } from './services/excel/excel-export'
import express, { type Express } from 'express'
import session from 'express-session'
import MySQLStoreFactory from 'express-mysql-session'
import helmet from 'helmet'
import path from 'node:path'
import fs from 'node:fs'
import { fileURLToPath } from 'node:url'
import type { AppContext } from './context'
import { configurePassport } from './auth/passport'
import { requestId } from './middleware/request-id'
import { requestLogger } from './logger'
import { originCheck } from './middleware/origin-check'
import { apiNotFound, errorHandler } from './middleware/error-handler'
import { refuseDeepJson } from './middleware/json-depth'
import { dbWatchdog } from './middleware/db-watchdog'
import { clientFiles } from './middleware/client-files'
import { authRoutes } from './routes/auth'
import { userRoutes } from './routes/users'
import { mailRoutes } from './routes/mail'
import { searchRoutes } from './routes/search'
import { healthRoutes } from './routes/health'
import { channelRoutes } from './routes/channels'
import { polarRoutes } from './routes/polar'
import { recordRoutes } from './routes/records/index'
import { labelRoutes } from './routes/labels'
import { excelRoutes } from './routes/excel'
import { auditRoutes } from './routes/audit'
import { analysisRoutes } from './routes/analysis'
import { overviewRoutes } from './routes/overview'

const MySQLStore = MySQLStoreFactory(session as never)

/** Where the built client lives (dist/client at the project root, from server/ or dist/server/). */
function findClientDir(): string {
  const here = path.dirname(fileURLToPath(import.meta.url))
  for (const c of [
    path.resolve(here, '../dist/client'),
    path.resolve(here, '../client'),
    path.resolve(process.cwd(), 'dist/client'),
  ]) {
    if (fs.existsSync(path.join(c, 'index.html'))) return c
  }
  return path.resolve(process.cwd(), 'dist/client')
}

/** Build the Express app without listening (tests drive it with supertest). */
export function createApp(ctx: AppContext): { app: Express; close: () => Promise<void> } {
  const app = express()
  app.disable('x-powered-by')
  app.set('trust proxy', 'loopback')

  setExportStaleness(ctx.env.EXPORT_STALE_S * 1000)
  const store = new MySQLStore(
    { createDatabaseTable: false, clearExpired: true, checkExpirationInterval: 15 * 60 * 1000 },
    ctx.pool as never,
  )
  const pp = configurePassport(ctx.db)

  app.use(
    helmet({
      contentSecurityPolicy: {
        directives: {
          'default-src': ["'self'"],
          'img-src': ["'self'", 'data:', 'blob:'],
          'style-src': ["'self'", "'unsafe-inline'"],
          'font-src': ["'self'", 'data:'],
          'connect-src': ["'self'"],
          'media-src': ["'self'", 'blob:'],
          'upgrade-insecure-requests': null,
        },
      },
      strictTransportSecurity: false,
    }),
  )
  app.use(requestId)
  app.use(requestLogger(ctx.log))
  // Health first: a load balancer's probe must get 503 (not a session-store error) when the DB is down.
  app.use('/api/health', healthRoutes(ctx))
  // Before the session store: a database that does not answer is a 503 within seconds, never a hang.
  app.use('/api', dbWatchdog(ctx.pool))
  app.use('/api', express.json({ limit: '1mb', verify: refuseDeepJson }))
  app.use(
    '/api',
    session({
      name: 'sid',
      secret: ctx.env.SESSION_SECRET,
      store,
      resave: false,
      saveUninitialized: false,
      rolling: true,
      cookie: { httpOnly: true, sameSite: 'lax', secure: 'auto', maxAge: 12 * 3600 * 1000 },
    }),
  )
  app.use('/api', pp.initialize(), pp.session())
  app.use('/api', originCheck)

  app.use('/api/auth', authRoutes(ctx, pp))
  app.use('/api/users', userRoutes(ctx))
  app.use('/api/mail', mailRoutes(ctx))
  app.use('/api/search', searchRoutes(ctx))
  app.use('/api/channels', channelRoutes())
  app.use('/api/polar', polarRoutes())
  app.use('/api/labels', labelRoutes(ctx))
  app.use('/api/excel', excelRoutes(ctx))
  app.use('/api/audit', auditRoutes(ctx))
  app.use('/api/analysis', analysisRoutes(ctx))
  app.use('/api/overview', overviewRoutes(ctx))
  app.use('/api', recordRoutes(ctx))
  app.use('/api', apiNotFound)

  app.use(clientFiles(findClientDir()))

  app.use(errorHandler(ctx.log))
  return {
    app,
    close: async () => {
      await store.close()
    },
  }
}
