import { ref } from 'vue'
import { useFieldErrors } from './useFieldErrors'

/**
 * Messages for fields that no input rule covers (a picker left empty …), by field path; a falsy value is no problem.
 */
export type FormChecks = Record<string, string | false | null | undefined>

export interface FormSubmitOptions {
  /**
   * The field paths this form shows under its inputs: a list, or a function (for paths that depend
   * on the form, e.g. `coefficients.3.source`) returning a list or answering for one path.
   * A server message for any other path goes to the general error.
   */
  shown: readonly string[] | (() => readonly string[]) | ((path: string) => boolean)
  /** Run on every submit together with the inputs' rules, so every missing field is flagged at once. */
  check?: () => FormChecks
}

/**
 * The submit, busy and error logic of a form dialog (see FormDialog.vue):
 * - `submit(fn)` clears the old messages, runs `check`, and if nothing is wrong runs `fn` (the save)
 *   with `busy` set; an API refusal `{ error, fields: { path: [msg] } }` fills `fieldErrors[path]`
 *   for the shown paths and `error` (the general error, in red) with whatever no field shows.
 * - `bind(path)` gives an input's `error` / `error-message` props and clears that field's message
 *   as soon as it is edited.
 * - `setError(path, msg)` flags a field by hand (a rule only the submit can check).
 */
export function useFormSubmit(options: FormSubmitOptions) {
  const fields = useFieldErrors()
  const fieldErrors = fields.errors
  const error = ref('')
  const busy = ref(false)

  function isShown(path: string): boolean {
    const shown = options.shown
    if (typeof shown !== 'function') return shown.includes(path)
    const answer = (shown as (p?: string) => readonly string[] | boolean)(path)
    return typeof answer === 'boolean' ? answer : answer.includes(path)
  }

  /** Forget every message (when the dialog opens again). */
  function reset(): void {
    fields.clear()
    error.value = ''
  }

  /** Flag the fields `check` finds wrong (clearing the old messages first); true when none is. */
  function runChecks(): boolean {
    reset()
    let ok = true
    for (const [path, message] of Object.entries(options.check?.() ?? {})) {
      if (message) {
        fieldErrors[path] = message
        ok = false
      }
    }
    return ok
  }

  /** Put an error (an ApiError or anything thrown) on the fields and the general error. */
  function take(err: unknown): void {
    const paths =
      err && typeof err === 'object' && 'fieldErrors' in err
        ? Object.keys((err as { fieldErrors: object }).fieldErrors)
        : []
    error.value = fields.take(err, paths.filter(isShown)) ?? ''
  }

  /** Run `fn` (the save) unless a check fails or a save is already running; true when it went through. */
  async function submit(fn: () => Promise<unknown>): Promise<boolean> {
    if (busy.value) return false
    if (!runChecks()) return false
    busy.value = true
    try {
      await fn()
      return true
    } catch (err) {
      take(err)
      return false
    } finally {
      busy.value = false
    }
  }

  function setError(path: string, message: string): void {
    fieldErrors[path] = message
  }

  function clear(path?: string): void {
    fields.clear(path)
  }

  function bind(path: string) {
    return { ...fields.bind(path), 'onUpdate:modelValue': () => fields.clear(path) }
  }

  return { fieldErrors, error, busy, submit, runChecks, take, reset, setError, clear, bind }
}

export type FormSubmit = ReturnType<typeof useFormSubmit>
