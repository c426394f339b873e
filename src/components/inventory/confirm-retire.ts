import { Dialog } from 'quasar'

const DEFAULT_MESSAGE = 'It stays in the records (history, measurements) but leaves the active lists. Say why:'

/** Ask for the reason before retiring a record (records are retired, never deleted). Resolves to the reason or null. */
export function confirmRetire(
  what: string,
  options: { message?: string; minLength?: number } = {},
): Promise<string | null> {
  const minLength = options.minLength ?? 3
  return new Promise((resolve) => {
    Dialog.create({
      title: `Retire ${what}?`,
      message: options.message ?? DEFAULT_MESSAGE,
      prompt: {
        model: '',
        type: 'text',
        outlined: true,
        label: 'Reason (required)',
        isValid: (v: string) => v.trim().length >= minLength,
      },
      cancel: true,
      ok: { label: 'Retire', color: 'negative', unelevated: true },
    })
      .onOk((reason: string) => resolve(reason.trim()))
      .onCancel(() => resolve(null))
      .onDismiss(() => resolve(null))
  })
}
