import { Dialog } from 'quasar'

/** Ask for the reason before retiring a record (records are retired, never deleted). Resolves to the reason or null. */
export function confirmRetire(what: string): Promise<string | null> {
  return new Promise((resolve) => {
    Dialog.create({
      title: `Retire ${what}?`,
      message: 'It stays in the records (history, measurements) but leaves the active lists. Say why:',
      prompt: { model: '', type: 'text', outlined: true, label: 'Reason (required)', isValid: (v: string) => v.trim().length >= 3 },
      cancel: true,
      ok: { label: 'Retire', color: 'negative', unelevated: true },
    }).onOk((reason: string) => resolve(reason.trim())).onCancel(() => resolve(null)).onDismiss(() => resolve(null))
  })
}
