import type { z } from 'zod'

/** Parse input with a zod schema from shared/; a ZodError becomes a field-level 400 in the error middleware. */
export function parse<S extends z.ZodType>(schema: S, input: unknown): z.infer<S> {
  return schema.parse(input)
}
