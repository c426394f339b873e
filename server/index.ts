import { randomBytes } from 'node:crypto'
import fs from 'node:fs'
import path from 'node:path'
import net from 'node:net'
import { loadEnv } from './env'
import { createDb } from './db/client'
import { createApp } from './app'
import { startMailSink } from './services/mail/mail-sink'
import { MailWorker } from './services/mail/mail'
import { NoticeScheduler } from './services/mail/notice-scheduler'
import { setNoticeBaseUrl } from './services/mail/notices'
import type { AppContext } from './context'
import { sweepExports } from './services/excel/excel-export'
import { createFileStorage } from './services/files/create-storage'
import { createLogger } from './logger'

/** Keep one session secret per data dir so restarts keep people signed in. */
function sessionSecret(dataDir: string): string {
  if (process.env.SESSION_SECRET) return process.env.SESSION_SECRET
  const file = path.join(dataDir, 'session-secret')
  if (!fs.existsSync(file)) {
    fs.mkdirSync(dataDir, { recursive: true })
    fs.writeFileSync(file, randomBytes(32).toString('hex'), { mode: 0o600 })
  }
  return fs.readFileSync(file, 'utf8').trim()
}

function tcpAnswers(host: string, port: number): Promise<boolean> {
  return new Promise((resolve) => {
    const s = net.connect({ host, port, timeout: 1000 }, () => {
      s.end()
      resolve(true)
    })
    s.on('error', () => resolve(false)).on('timeout', () => {
      s.destroy()
      resolve(false)
    })
  })
}

async function main() {
  const dataDir = process.env.DATA_DIR ?? '.data'
  const env = loadEnv({ ...process.env, SESSION_SECRET: sessionSecret(dataDir) })
  const log = createLogger(env.LOG_LEVEL)
  const { pool, db } = createDb(env.DATABASE_URL, 20, { syncWait: env.DATABASE_SYNC_WAIT })

  let smtpUrl = env.SMTP_URL
  let sink: Awaited<ReturnType<typeof startMailSink>> | undefined
  if (!smtpUrl) {
    sink = await startMailSink(db, env.SMTP_SINK_PORT, log)
    smtpUrl = `smtp://127.0.0.1:${sink.port}?ignoreTLS=true`
    log.info(
      { port: sink.port },
      `local SMTP sink on 127.0.0.1:${sink.port} (messages appear under Admin → Mail outbox)`,
    )
  }
  const smtp = new URL(smtpUrl)
  const worker = new MailWorker(db, smtpUrl, env.MAIL_FROM, log)
  worker.start()

  const ctx: AppContext = {
    db,
    pool,
    env,
    log,
    startedAt: Date.now(),
    publicUrl: (env.PUBLIC_URL ?? `http://${env.HOST}:${env.PORT}`).replace(/\/$/, ''),
    mailUp: () => tcpAnswers(smtp.hostname, Number(smtp.port || 25)),
  }
  setNoticeBaseUrl(ctx.publicUrl)
  const notices = new NoticeScheduler(db, log, env.NOTICE_INTERVAL_S * 1000)
  notices.start()
  // Expired export jobs and their workbooks also go when nobody starts a new export.
  const exportStorage = createFileStorage(env.DATA_DIR, env)
  const exportSweep = setInterval(
    () => {
      sweepExports(db, exportStorage, env.DATA_DIR).catch((err) => log.error({ err }, 'export sweep failed'))
    },
    10 * 60 * 1000,
  )
  exportSweep.unref()
  const { app, close } = createApp(ctx)
  const server = app.listen(env.PORT, env.HOST, () => {
    log.info({ url: ctx.publicUrl }, `Overtone is running at ${ctx.publicUrl}`)
  })

  let stopping = false
  const stop = async (signal: string) => {
    if (stopping) return
    stopping = true
    log.info({ signal }, `${signal}: shutting down`)
    server.close()
    server.closeAllConnections?.()
    clearInterval(exportSweep)
    await notices.stop()
    await worker.stop()
    await sink?.close()
    await close()
    await pool.end()
    process.exit(0)
  }
  process.on('SIGINT', () => void stop('SIGINT'))
  process.on('SIGTERM', () => void stop('SIGTERM'))
}

main().catch((err) => {
  console.error(err instanceof Error ? err.message : err)
  process.exit(1)
})
