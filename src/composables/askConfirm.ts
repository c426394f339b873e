import { Dialog } from 'quasar'

/** A yes/no question in a dialog; resolves true only when the person presses the OK button. */
export function askConfirm(options: {
  title: string
  message: string
  ok: string
  cancel?: string
  color?: string
}): Promise<boolean> {
  return new Promise((resolve) => {
    let answered = false
    Dialog.create({
      title: options.title,
      message: options.message,
      persistent: true,
      cancel: { label: options.cancel ?? 'Cancel', flat: true },
      ok: { label: options.ok, color: options.color ?? 'primary', unelevated: true },
    })
      .onOk(() => {
        answered = true
        resolve(true)
      })
      .onCancel(() => resolve(false))
      .onDismiss(() => {
        if (!answered) resolve(false)
      })
  })
}
