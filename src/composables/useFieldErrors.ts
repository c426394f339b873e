import { reactive } from 'vue'
import { z, type ZodType } from 'zod'
import { isApiError } from '../api/http'

/**
 * Server-side field errors for a form. `bind('email')` gives the `error` and `error-message`
 * props of a Quasar input, so a 400 answer shows as red hints under the right fields.
 * `take` returns the message that no field shows (or null when the hints say it all).
 */
export function useFieldErrors() {
  const errors = reactive<Record<string, string>>({})

  function clear(field?: string): void {
    for (const key of Object.keys(errors)) if (!field || key === field) delete errors[key]
  }

  /** `shownFields`: the fields this form has; messages for any other field are returned. */
  function take(err: unknown, shownFields: readonly string[]): string | null {
    clear()
    if (!isApiError(err)) return err instanceof Error ? err.message : String(err)
    const unshown: string[] = []
    for (const [path, messages] of Object.entries(err.fieldErrors)) {
      // A message that repeats its own field path ("crystal.normal: cannot read …") is shown without it under the
      // field.
      if (shownFields.includes(path))
        errors[path] = messages.map((m) => (m.startsWith(`${path}: `) ? m.slice(path.length + 2) : m)).join(' ')
      else unshown.push(...messages)
    }
    if (Object.keys(errors).length === 0) return unshown.length ? unshown.join(' ') : err.message
    return unshown.length ? unshown.join(' ') : null
  }

  function bind(field: string) {
    return { error: Boolean(errors[field]), errorMessage: errors[field] ?? '' }
  }

  return { errors, clear, take, bind }
}

/**
 * A Quasar input rule from a zod schema (the same schema the server parses with). A blank input
 * ('' or null) is "Required" when the schema needs a value and passes when the field is optional
 * (a blank number input is '' and would otherwise be coerced to 0 and judged as a number).
 * `field`: the field's name, for the unit its ending names.
 */
export function zodRule(schema: ZodType, field?: string) {
  // Parsed under the field's name when given, so the shared map can read its unit ("At most 1 000 000 pm/V").
  const parse = (v: unknown) => (field ? z.object({ [field]: schema }).safeParse({ [field]: v }) : schema.safeParse(v))
  return (value: unknown): true | string => {
    const result = parse(value)
    if (result.success) return true
    const issue = result.error.issues[0]
    if (value === '' || value === null || value === undefined) {
      if (parse(undefined).success) return true
      // A text rule's own word for an empty text ("Enter a name") is kept.
      if (issue?.code === 'too_small' && issue.origin === 'string') return issue.message
      return 'Required'
    }
    return issue?.message ?? 'Not valid'
  }
}
