import { isNodeFault } from './failover-pool'

/**
 * Transactions the database refused as a whole are run again, a bounded number of times:
 *
 * - ER_LOCK_DEADLOCK (1213): an InnoDB deadlock, or on Galera a certification conflict (another
 *   node committed a write to the same rows first; Galera reports it as a deadlock at COMMIT, or
 *   aborts the local transaction mid-way). The transaction was rolled back: nothing of it is left.
 * - 1047 "WSREP has not yet prepared node for application use": the node left the primary
 *   component or is not synced; nothing ran. The pool has marked the node down, so the next try
 *   goes to another one.
 * - the connection broke (node killed, restarted) before COMMIT was sent: nothing was committed
 *   (an open transaction dies with its connection). A break during COMMIT is not retried: the
 *   commit may have happened, and the caller gets the error (503, "reload to see whether it was
 *   saved").
 *
 * `FOR UPDATE` locks only on the node that runs the transaction; two app servers on different nodes
 * both get their locks, and certification refuses the later commit with 1213, which is retried
 * here. So a read-check-write in a transaction stays correct on a cluster: the retry reads again.
 */
export const TX_ATTEMPTS = 8

type Coded = { code?: string; errno?: number; cause?: unknown; message?: string }

/** The mysql2 errors in `err` (Drizzle wraps them as `cause`). */
function chain(err: unknown): Coded[] {
  const out: Coded[] = []
  for (
    let e = err as Coded | undefined, i = 0;
    e && typeof e === 'object' && i < 5;
    e = e.cause as Coded | undefined, i++
  )
    out.push(e)
  return out
}

export function isRetryableTxError(err: unknown, commitSent: boolean): boolean {
  const errs = chain(err)
  if (errs.some((e) => e.errno === 1213 || e.code === 'ER_LOCK_DEADLOCK')) return true
  if (errs.some((e) => e.errno === 1047 || e.code === 'WSREP_NOT_READY')) return true
  return !commitSent && errs.some(isNodeFault)
}

/** Jittered exponential back-off, at most 500 ms a pause (all eight attempts: about 1–2 s). */
const pause = (attempt: number) =>
  new Promise((r) => setTimeout(r, Math.round(Math.min(500, (5 + Math.random() * 20) * 2 ** attempt))))

/**
 * Run `attempt` (one whole transaction) until it commits, at most TX_ATTEMPTS times. `attempt`
 * gets `commitSent`, to call after its own work and before the COMMIT goes out.
 */
export async function withTxRetry<T>(
  attempt: (commitSent: () => void) => Promise<T>,
  attempts = TX_ATTEMPTS,
): Promise<T> {
  for (let i = 1; ; i++) {
    let sent = false
    try {
      return await attempt(() => {
        sent = true
      })
    } catch (err) {
      if (i >= attempts || !isRetryableTxError(err, sent)) throw err
      await pause(i)
    }
  }
}
