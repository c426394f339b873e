import { Notify } from 'quasar'
import { isApiError } from '../api/http'
import { confirmRetire } from '../components/inventory/confirm-retire'

/** What went wrong, in words: the server's message and any field messages it did not repeat. */
export function actionErrorText(err: unknown, fallback: string): string {
  const message = err instanceof Error && err.message ? err.message : fallback
  const fields = isApiError(err)
    ? Object.values(err.fieldErrors)
        .flat()
        .filter((m) => !message.includes(m))
    : []
  return [message, ...fields].join(' ')
}

/**
 * An action on a record page (retire, change status, recompute, submit): runs `fn`, then tells how
 * it went in a notification (`done` on success, the server's message on failure, or `failed`
 * when it gave none). Resolves to whether it went through.
 */
export async function runAction(
  fn: () => Promise<unknown>,
  words: { done: string | (() => string); failed: string },
): Promise<boolean> {
  try {
    await fn()
    Notify.create({ type: 'positive', message: typeof words.done === 'function' ? words.done() : words.done })
    return true
  } catch (err) {
    Notify.create({ type: 'negative', message: actionErrorText(err, words.failed) })
    return false
  }
}

/** Ask why (records are retired, never deleted), then retire with that reason and say so. */
export async function retireRecord(
  what: string,
  retire: (reason: string) => Promise<unknown>,
  options: { message?: string; minLength?: number; done?: string } = {},
): Promise<boolean> {
  const reason = await confirmRetire(what, options)
  if (!reason) return false
  return runAction(() => retire(reason), { done: options.done ?? `${what} retired.`, failed: 'Not retired' })
}
