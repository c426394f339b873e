import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import { inArray, like } from 'drizzle-orm'
import { mailQueue, mailReceived } from '../../../server/db/schema/index'
import { queueMail } from '../../../server/services/mail/mail'
import { startTestApp } from '../helpers'
import { uid } from '../inventory-helpers'

/**
 * Two app servers on one database each run a mail worker on the same queue (each with its own SMTP
 * sink here, as two servers would each reach the mail server): every message goes out once.
 * Before the claim, both workers read the same due rows and both sent them.
 */
let a: Awaited<ReturnType<typeof startTestApp>>
let b: Awaited<ReturnType<typeof startTestApp>>
beforeAll(async () => {
  a = await startTestApp()
  b = await startTestApp()
})
afterAll(async () => {
  await a.stop()
  await b.stop()
})

describe('mail workers of two app servers', () => {
  it('send each queued message exactly once, also when both pass over the queue at the same moment', async () => {
    const tag = `claim-${uid()}`
    const count = 12
    await a.db.transaction(async (tx) => {
      for (let i = 0; i < count; i++)
        await queueMail(tx, { to: `${tag}-${i}@kestrel-lab.example`, subject: `${tag} #${i}`, text: `message ${i}` })
    })
    const ours = await a.db
      .select({ id: mailQueue.id })
      .from(mailQueue)
      .where(like(mailQueue.subject, `${tag} #%`))
    expect(ours).toHaveLength(count)
    const ids = ours.map((r) => r.id)
    // Other test files may have left mail in the shared queue: pass until ours is all sent (bounded).
    for (let pass = 0; pass < 40; pass++) {
      const rows = await a.db.select({ status: mailQueue.status }).from(mailQueue).where(inArray(mailQueue.id, ids))
      if (rows.every((r) => r.status === 'sent')) break
      await Promise.all([a.worker.tick(), b.worker.tick(), a.worker.tick(), b.worker.tick()])
    }
    const rows = await a.db.select().from(mailQueue).where(inArray(mailQueue.id, ids))
    expect(rows.map((r) => r.status)).toEqual(Array(count).fill('sent'))
    expect(rows.every((r) => r.claimedBy === null && r.claimedUntil === null)).toBe(true)
    const received = await a.db
      .select({ subject: mailReceived.subject })
      .from(mailReceived)
      .where(like(mailReceived.subject, `${tag} #%`))
    const perSubject = new Map<string, number>()
    for (const r of received) perSubject.set(r.subject, (perSubject.get(r.subject) ?? 0) + 1)
    expect(perSubject.size).toBe(count)
    expect([...perSubject.values()].every((n) => n === 1)).toBe(true)
  })

  it('leave a row another worker holds a live claim on, and take it once that claim has run out', async () => {
    const tag = `claim-held-${uid()}`
    await a.db.transaction((tx) => queueMail(tx, { to: `${tag}@kestrel-lab.example`, subject: tag, text: 'held' }))
    const [{ id }] = await a.db.select({ id: mailQueue.id }).from(mailQueue).where(like(mailQueue.subject, tag))
    const { eq, sql } = await import('drizzle-orm')
    // A worker that stopped mid-send left its claim: a live claim is left alone …
    await a.db
      .update(mailQueue)
      .set({ claimedBy: 'stopped-server', claimedUntil: sql`NOW(3) + INTERVAL 1 HOUR` })
      .where(eq(mailQueue.id, id))
    for (let i = 0; i < 3; i++) await b.worker.tick()
    expect((await a.db.select().from(mailQueue).where(eq(mailQueue.id, id)))[0].status).toBe('queued')
    // … and a run-out one is taken over.
    await a.db
      .update(mailQueue)
      .set({ claimedUntil: sql`NOW(3) - INTERVAL 1 SECOND` })
      .where(eq(mailQueue.id, id))
    for (let i = 0; i < 40; i++) {
      if ((await a.db.select().from(mailQueue).where(eq(mailQueue.id, id)))[0].status === 'sent') break
      await b.worker.tick()
    }
    expect((await a.db.select().from(mailQueue).where(eq(mailQueue.id, id)))[0].status).toBe('sent')
    expect(await a.db.select().from(mailReceived).where(like(mailReceived.subject, tag))).toHaveLength(1)
  })
})
