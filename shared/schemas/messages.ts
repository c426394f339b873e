import { z } from 'zod'

/**
 * One error map for every zod schema, on the server and in the browser: zod's own wording ("Too
 * big: expected number to be <=1000000", "Invalid input: expected number, received string") becomes
 * plain words ("At most 1 000 000 nm", "Enter a number"). A message a schema states itself is kept;
 * this map only fills in where it says nothing. Installed when this module is loaded (the shared
 * schemas, the server's error handler and the client's main.ts import it).
 */

/** Units by the ending of a field name (units are in the field names: `diameterNm`, `thicknessUm`, `rotationDeg` …). */
const UNIT_SUFFIXES: readonly (readonly [RegExp, string])[] = [
  [/PmV$/, ' pm/V'],
  [/Nm$/, ' nm'],
  [/Um$/, ' µm'],
  [/Mm$/, ' mm'],
  [/Deg$/, '°'],
  [/Mrad$/, ' mrad'],
  [/Mhz$/, ' MHz'],
  [/Hz$/, ' Hz'],
  [/Mw$/, ' mW'],
  [/Fs$/, ' fs'],
  [/Uj$/, ' µJ'],
  [/Ev$/, ' eV'],
  [/[a-z]S$/, ' s'],
]

/** The unit (with its leading space, none for °) that the last named segment of `path` carries; '' when none. */
export function unitOfPath(path: readonly PropertyKey[] | undefined): string {
  const name = [...(path ?? [])].reverse().find((p): p is string => typeof p === 'string')
  if (!name) return ''
  return UNIT_SUFFIXES.find(([re]) => re.test(name))?.[1] ?? ''
}

/**
 * `n` with its digits in groups of three from 10 000 on, separated by a no-break space, and a
 * minus sign for negatives (SI Brochure, 9th edition, 5.4.4: "numbers may be divided in groups of
 * three … separated by a space"; four-digit numbers are usually left whole).
 */
export function groupDigits(n: number): string {
  if (!Number.isFinite(n)) return String(n)
  const [whole, fraction] = String(Math.abs(n)).split('.')
  const grouped = whole!.length > 4 ? whole!.replace(/\B(?=(\d{3})+$)/g, '\u00a0') : whole!
  return `${n < 0 ? '−' : ''}${grouped}${fraction ? `.${fraction}` : ''}`
}

/** "At most 20 000 nm", "At least −360°": a limit with the field's unit. */
export function limitText(
  word: 'At most' | 'At least' | 'Less than' | 'More than',
  limit: number | bigint,
  unit = '',
): string {
  return `${word} ${groupDigits(Number(limit))}${unit}`
}

const COUNT_WORDS: Record<string, [string, string]> = {
  string: ['character', 'characters'],
  array: ['item', 'items'],
  set: ['item', 'items'],
  file: ['byte', 'bytes'],
}
const counted = (n: number | bigint, origin: string) => {
  const [one, many] = COUNT_WORDS[origin] ?? ['', '']
  return `${groupDigits(Number(n))} ${Number(n) === 1 ? one : many}`.trimEnd()
}
const TYPE_WORDS: Record<string, string> = {
  number: 'Enter a number',
  int: 'Enter a whole number',
  bigint: 'Enter a whole number',
  string: 'Enter text',
  boolean: 'Choose yes or no',
  array: 'Give a list',
  object: 'Fill in the fields',
  date: 'Enter a date',
}
const FORMAT_WORDS: Record<string, string> = {
  email: 'Enter a valid e-mail address',
  url: 'Enter a web address (https://…)',
  date: 'Use the form YYYY-MM-DD',
  datetime: 'Enter a date and time',
  time: 'Enter a time (hh:mm)',
  uuid: 'Not a valid identifier',
}

type Issue = z.core.$ZodRawIssue

/** The plain message for a zod issue that carries no message of its own. */
export function plainMessage(issue: Issue): string {
  const missing = issue.input === undefined && !('received' in issue && issue.received === 'NaN')
  switch (issue.code) {
    case 'invalid_type':
      if (missing || issue.input === null) return 'Required'
      return TYPE_WORDS[issue.expected] ?? 'Not a valid value'
    case 'too_big': {
      if (issue.origin === 'number' || issue.origin === 'bigint') {
        return limitText(issue.inclusive === false ? 'Less than' : 'At most', issue.maximum, unitOfPath(issue.path))
      }
      if (issue.origin === 'date') return `On or before ${new Date(Number(issue.maximum)).toISOString().slice(0, 10)}`
      return `At most ${counted(issue.maximum, issue.origin)}`
    }
    case 'too_small': {
      if (issue.origin === 'number' || issue.origin === 'bigint') {
        return limitText(issue.inclusive === false ? 'More than' : 'At least', issue.minimum, unitOfPath(issue.path))
      }
      if (issue.origin === 'date') return `On or after ${new Date(Number(issue.minimum)).toISOString().slice(0, 10)}`
      // An empty text (after trimming) or an empty list is a field left out.
      if (Number(issue.minimum) === 1 && issue.origin === 'string') return 'Required'
      if (Number(issue.minimum) === 1 && (issue.origin === 'array' || issue.origin === 'set')) return 'Add at least one'
      return `At least ${counted(issue.minimum, issue.origin)}`
    }
    case 'invalid_value': {
      if (missing) return 'Required'
      const values = issue.values.map(String)
      return values.length === 1
        ? `Use ${values[0]}`
        : values.length <= 12
          ? `Pick one of: ${values.join(', ')}`
          : 'Pick one of the listed values'
    }
    case 'invalid_format':
      return (
        FORMAT_WORDS[issue.format] ??
        (issue.format === 'regex' ? 'Not in the expected form' : 'Not in the expected form')
      )
    case 'not_multiple_of':
      return `Use a multiple of ${groupDigits(Number(issue.divisor))}${unitOfPath(issue.path)}`
    case 'unrecognized_keys':
      return `Not a field here: ${issue.keys.join(', ')}`
    case 'invalid_union': {
      if (missing) return 'Required'
      // Each branch refused only the type (e.g. number | null): say what would do.
      const expected = issue.errors.flatMap((branch) =>
        branch.length === 1 && branch[0]!.code === 'invalid_type' ? [branch[0]!.expected] : [],
      )
      if (expected.includes('number') || expected.includes('int')) return 'Enter a number'
      if (expected.includes('string')) return 'Enter text'
      return 'Not a valid value'
    }
    case 'invalid_key':
      return 'Not a valid name'
    case 'invalid_element':
      return 'Not a valid entry'
    default:
      return 'Not valid'
  }
}

z.config({ customError: plainMessage })
