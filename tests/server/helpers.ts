import request from 'supertest'
import { desc, like } from 'drizzle-orm'
import type { Express } from 'express'
import { createDb } from '../../server/db/client'
import { createApp } from '../../server/app'
import { loadEnv } from '../../server/env'
import { startMailSink } from '../../server/services/mail/mail-sink'
import { MailWorker } from '../../server/services/mail/mail'
import type { AppContext } from '../../server/context'
import { silentLogger } from '../../server/logger'
import { DEMO_PASSWORD, DEMO_PEOPLE } from '../../server/db/seed/people'
import type { Role } from '../../shared/roles'
import { mailReceived } from '../../server/db/schema/index'

/**
 * A test instance of the app on the real MariaDB that scripts/test.sh started (DATABASE_URL),
 * with its own loopback SMTP sink and a mail worker the test can tick by hand. `envOverrides`
 * replace settings of this instance only (e.g. small import limits).
 */
export async function startTestApp(envOverrides: Record<string, string> = {}) {
  const env = loadEnv({
    ...process.env,
    SESSION_SECRET: 'test-secret-test-secret',
    LOG_LEVEL: 'silent',
    LOGIN_MAX_FAILURES: '5',
    ...envOverrides,
  })
  const { pool, db } = createDb(env.DATABASE_URL, 5)
  const log = silentLogger()
  const sink = await startMailSink(db, 0, log)
  const worker = new MailWorker(db, `smtp://127.0.0.1:${sink.port}?ignoreTLS=true`, env.MAIL_FROM, log)
  const ctx: AppContext = {
    db,
    pool,
    env,
    log,
    publicUrl: 'http://overtone.test',
    mailUp: async () => true,
    startedAt: Date.now(),
  }
  const { app, close } = createApp(ctx)
  return {
    app,
    db,
    pool,
    worker,
    ctx,
    async stop() {
      await worker.stop()
      await sink.close()
      await close()
      await pool.end()
    },
  }
}

export type TestApp = Awaited<ReturnType<typeof startTestApp>>

/**
 * Ticks the test app's mail worker until a message to `to` reaches the sink, and returns the newest
 * one as its owner's mailbox has it (the sink's table; the outbox view masks one-time links).
 * Other test files may have left mail in the shared queue ahead of ours.
 */
export async function deliveredTo(t: TestApp, to: string) {
  for (let i = 0; i < 1000; i++) {
    await t.worker.tick()
    const [row] = await t.db
      .select()
      .from(mailReceived)
      .where(like(mailReceived.toAddress, `%${to}%`))
      .orderBy(desc(mailReceived.id))
      .limit(1)
    if (row) return row
  }
  throw new Error(`no mail to ${to} reached the sink`)
}

export const demoEmail = (role: Role) => DEMO_PEOPLE.find((p) => p.roles.includes(role))!.email

/** A supertest agent (keeps cookies) signed in as the demo person holding `role`. */
export async function signedInAs(app: Express, role: Role | string, password = DEMO_PASSWORD) {
  const agent = request.agent(app)
  const email = role.includes('@') ? role : demoEmail(role as Role)
  const res = await agent.post('/api/auth/login').send({ email, password })
  if (res.status !== 200) throw new Error(`sign-in as ${email} failed: ${res.status} ${JSON.stringify(res.body)}`)
  return agent
}

export const uniqueEmail = (tag: string) =>
  `${tag}-${Date.now()}-${Math.floor(Math.random() * 1e6)}@kestrel-lab.example`

/**
 * A new active person with these roles and the demo password (for cases the demo lab lacks, e.g. a second safety
 * officer).
 */
export async function createPerson(
  db: ReturnType<typeof createDb>['db'],
  roles: Role[],
  tag = 'person',
): Promise<{ id: number; email: string }> {
  const { users } = await import('../../server/db/schema/index')
  const { hashPassword } = await import('../../server/auth/passwords')
  const email = uniqueEmail(tag)
  const [{ id }] = await db
    .insert(users)
    .values({ email, name: `Test ${tag}`, roles, passwordHash: await hashPassword(DEMO_PASSWORD) })
    .$returningId()
  return { id, email }
}
