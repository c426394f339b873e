import { describe, it, expect, beforeAll, afterAll } from 'vitest'
import net from 'node:net'
import { inArray, eq } from 'drizzle-orm'
import { mailQueue, mailReceived } from '../../../server/db/schema/index'
import { startTestApp, signedInAs, uniqueEmail } from '../helpers'
import { makeBox, makeChip } from '../inventory-helpers'
import { makePerson, mailTo, retirePeople } from './notices-helpers'
import { MailWorker } from '../../../server/services/mail/mail'
import { startMailSink } from '../../../server/services/mail/mail-sink'

let t: Awaited<ReturnType<typeof startTestApp>>
const made: number[] = []
beforeAll(async () => {
  t = await startTestApp()
})
afterAll(async () => {
  await retirePeople(t.db, made)
  await t.stop()
})

/** A local port nothing listens on (taken, then released). */
async function closedPort(): Promise<number> {
  const s = net.createServer()
  await new Promise<void>((r) => s.listen(0, '127.0.0.1', () => r()))
  const port = (s.address() as net.AddressInfo).port
  await new Promise((r) => s.close(r))
  return port
}

/** Tick until every message in `ids` passes `done` (other tests' queued mail may be ahead of ours). */
async function tickUntil(worker: MailWorker, ids: number[], done: (m: typeof mailQueue.$inferSelect) => boolean) {
  for (let i = 0; i < 1000; i++) {
    const rows = await t.db.select().from(mailQueue).where(inArray(mailQueue.id, ids))
    if (rows.every(done)) return
    await worker.tick()
  }
}

describe('mail server down', () => {
  it('a hand-off move and an invitation still succeed; the mail waits with its error and goes out when the server is back', async () => {
    const port = await closedPort()
    const down = new MailWorker(
      t.db,
      `smtp://127.0.0.1:${port}?ignoreTLS=true&connectionTimeout=2000`,
      t.ctx.env.MAIL_FROM,
      t.ctx.log,
    )
    const fab = await signedInAs(t.app, 'fab_technician')
    const admin = await signedInAs(t.app, 'admin')
    const receiver = await makePerson(t.db, ['optics_staff'])
    made.push(receiver.id)
    const { chip } = await makeChip(fab)
    const { box } = await makeBox(fab)

    const moved = await fab
      .post('/api/moves')
      .send({ itemCode: chip.code, toLocationId: box.id, handToUserId: receiver.id, note: 'for the SHG run' })
    expect(moved.status).toBe(201)
    expect(moved.body.handedTo.id).toBe(receiver.id)
    const invitee = uniqueEmail('down-invitee')
    const invited = await admin
      .post('/api/users/invite')
      .send({ email: invitee, name: 'Noor Vestergaard', roles: ['fab_technician'] })
    expect(invited.status).toBe(201)
    const ids = [...(await mailTo(t.db, receiver.email)), ...(await mailTo(t.db, invitee))].map((m) => m.id)
    expect(ids).toHaveLength(2)
    await tickUntil(down, ids, (m) => m.attempts > 0)
    const waiting = await t.db.select().from(mailQueue).where(inArray(mailQueue.id, ids))
    for (const m of waiting) {
      expect(m.status).toBe('queued')
      expect(m.attempts).toBe(1)
      expect(m.lastError).toMatch(/ECONNREFUSED|connect/i)
      expect(m.nextAttemptAt.getTime()).toBeGreaterThan(Date.now())
    }
    expect(waiting.find((m) => m.toAddress === receiver.email)!.subject).toBe(
      `Overtone: ${chip.code} was handed to you`,
    )
    await down.stop()

    // The mail server comes back on the same port and the back-off delay has passed.
    const sink = await startMailSink(t.db, port, t.ctx.log)
    const back = new MailWorker(t.db, `smtp://127.0.0.1:${port}?ignoreTLS=true`, t.ctx.env.MAIL_FROM, t.ctx.log)
    try {
      await t.db
        .update(mailQueue)
        .set({ nextAttemptAt: new Date(Date.now() - 1000) })
        .where(inArray(mailQueue.id, ids))
      await tickUntil(back, ids, (m) => m.status === 'sent')
      const sent = await t.db.select().from(mailQueue).where(inArray(mailQueue.id, ids))
      for (const m of sent) {
        expect(m.status).toBe('sent')
        expect(m.attempts).toBe(2)
        expect(m.lastError).toBeNull()
      }
      const received = await t.db.select().from(mailReceived).where(eq(mailReceived.toAddress, receiver.email))
      expect(received.some((r) => r.subject.includes(chip.code) && r.htmlBody?.includes('Overtone'))).toBe(true)
    } finally {
      await back.stop()
      await sink.close()
    }
  })
})
