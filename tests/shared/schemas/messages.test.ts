import { describe, it, expect } from 'vitest'
import { z } from 'zod'
import { groupDigits, unitOfPath } from '../../../shared/schemas/messages'
import {
  arraySchema,
  coefficientSchema,
  diceSchema,
  laserSetupSchema,
  locationSchema,
  waferSchema,
} from '../../../shared/schemas/records'

/** The message of each field path after a failed parse (the first one per path). */
function messages(schema: z.ZodType, input: unknown): Record<string, string> {
  const r = schema.safeParse(input)
  expect(r.success).toBe(false)
  const out: Record<string, string> = {}
  for (const i of r.error!.issues) out[i.path.join('.') || '_'] ??= i.message
  return out
}

describe('plain zod messages (shared/schemas/messages.ts)', () => {
  it('a number over its limit names the limit with digit groups and the unit of the field', () => {
    const m = messages(arraySchema, {
      chipId: 1,
      position: 'B2',
      shape: 'disk',
      lattice: 'single',
      dimensionsNm: { diameterNm: 2e6 },
    })
    expect(m['dimensionsNm.diameterNm']).toBe('At most 1\u00a0000\u00a0000 nm')
    expect(messages(z.object({ count: z.number().max(1e6) }), { count: 2e6 }).count).toBe('At most 1\u00a0000\u00a0000')
    expect(messages(z.object({ spinRpm: z.number().min(-5).max(9) }), { spinRpm: -6 }).spinRpm).toBe('At least −5')
    expect(messages(z.object({ gapNm: z.number().positive() }), { gapNm: 0 }).gapNm).toBe('More than 0 nm')
    expect(messages(z.object({ angleDeg: z.number().lt(90) }), { angleDeg: 90 }).angleDeg).toBe('Less than 90°')
  })

  it('text where a number belongs, a fraction where a whole number belongs', () => {
    expect(messages(z.object({ valuePmV: z.number() }), { valuePmV: 'abc' }).valuePmV).toBe('Enter a number')
    expect(messages(z.object({ n: z.coerce.number() }), { n: 'abc' }).n).toBe('Enter a number')
    expect(messages(z.object({ n: z.number().int() }), { n: 1.5 }).n).toBe('Enter a whole number')
    expect(messages(z.object({ n: z.union([z.number(), z.null()]) }), { n: 'x' }).n).toBe('Enter a number')
  })

  it('missing fields are "Required", all of them at once', () => {
    const m = messages(
      z.object({
        name: z.string(),
        kind: z.enum(['a', 'b']),
        n: z.number(),
        tags: z.array(z.string()),
        empty: z.string().min(1),
      }),
      { empty: '' },
    )
    expect(m).toEqual({ name: 'Required', kind: 'Required', n: 'Required', tags: 'Required', empty: 'Required' })
    expect(messages(locationSchema, {})).toMatchObject({ kind: 'Required', name: 'Required' })
  })

  it('too long text and lists say their limit', () => {
    expect(messages(z.object({ lot: z.string().max(60) }), { lot: 'x'.repeat(61) }).lot).toBe('At most 60 characters')
    expect(messages(z.object({ lot: z.string().min(3) }), { lot: 'x' }).lot).toBe('At least 3 characters')
    expect(messages(z.object({ items: z.array(z.number()).max(2) }), { items: [1, 2, 3] }).items).toBe(
      'At most 2 items',
    )
    expect(messages(waferSchema, { lot: 'x'.repeat(61) }).lot).toBe('At most 60 characters')
  })

  it('a value outside a list of choices names the choices', () => {
    expect(messages(z.object({ kind: z.enum(['room', 'box']) }), { kind: 'hall' }).kind).toBe('Pick one of: room, box')
    expect(messages(diceSchema, { waferId: 1, count: 2.5, widthMm: 5, heightMm: 5 }).count).toBe('Enter a whole number')
  })

  it('messages a schema states itself are kept', () => {
    expect(
      messages(coefficientSchema, { component: 'q', order: 2, valuePmV: 1, wavelengthNm: 10, source: 'x' }),
    ).toMatchObject({ component: 'Use d11…d36 for χ(2) or e.g. xxxx for χ(3)', wavelengthNm: 'At least 100 nm' })
    expect(laserSetupSchema).toBeDefined()
    // A schema's catch-all wording for "not a number" does not hide the limit.
    const coef = { component: 'd14', order: 2, wavelengthNm: 1064, source: 'x' }
    expect(messages(coefficientSchema, { ...coef, valuePmV: 2e6 }).valuePmV).toBe('At most 1\u00a0000\u00a0000 pm/V')
    expect(messages(coefficientSchema, { ...coef, valuePmV: 'x' }).valuePmV).toMatch(/^Enter the value in pm\/V/)
  })

  it('units are read from the field name, digits grouped in threes from 10 000 on', () => {
    expect(unitOfPath(['dimensionsNm', 'diameterNm'])).toBe(' nm')
    expect(unitOfPath(['wavelengthsNm', 0])).toBe(' nm')
    expect(unitOfPath(['thicknessUm'])).toBe(' µm')
    expect(unitOfPath(['rotationDeg'])).toBe('°')
    expect(unitOfPath(['repRateHz'])).toBe(' Hz')
    expect(unitOfPath(['exposureS'])).toBe(' s')
    expect(unitOfPath(['valuePmV'])).toBe(' pm/V')
    expect(unitOfPath(['count'])).toBe('')
    expect(unitOfPath(['chips'])).toBe('')
    expect(groupDigits(1000)).toBe('1000')
    expect(groupDigits(20000)).toBe('20\u00a0000')
    expect(groupDigits(-1234567.25)).toBe('−1\u00a0234\u00a0567.25')
    expect(groupDigits(0.1)).toBe('0.1')
  })
})
