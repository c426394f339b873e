import { describe, it, expect } from 'vitest'
import { ApiError } from '../../../src/api/http'
import { useFormSubmit } from '../../../src/composables/useFormSubmit'

/** A 400 answer as the server's error handler sends it. */
const refusal = (fields: Record<string, string[]>, message = 'Some fields are not valid') =>
  new ApiError(400, { error: 'bad_request', message, fields })

describe('useFormSubmit', () => {
  it('puts every server field message on its field, and what no field shows in the general error', async () => {
    const form = useFormSubmit({ shown: ['name', 'lot', 'diameterMm'] })
    const ok = await form.submit(async () => {
      throw refusal({
        name: ['Required'],
        lot: ['At most 60 characters'],
        diameterMm: ['At most 450 mm', 'Enter a number'],
        materialId: ['Pick one'],
      })
    })
    expect(ok).toBe(false)
    expect({ ...form.fieldErrors }).toEqual({
      name: 'Required',
      lot: 'At most 60 characters',
      diameterMm: 'At most 450 mm Enter a number',
    })
    expect(form.error.value).toBe('Pick one')
    expect(form.bind('lot')).toMatchObject({ error: true, errorMessage: 'At most 60 characters' })
    expect(form.bind('notes')).toMatchObject({ error: false, errorMessage: '' })
  })

  it('when every message is on a field the general error stays empty; a refusal without fields shows its message', async () => {
    const form = useFormSubmit({ shown: ['name'] })
    await form.submit(async () => {
      throw refusal({ name: ['name: Enter a name'] })
    })
    expect(form.fieldErrors.name).toBe('Enter a name')
    expect(form.error.value).toBe('')
    await form.submit(async () => {
      throw new ApiError(409, { error: 'conflict', message: 'Changed meanwhile; reload' })
    })
    expect({ ...form.fieldErrors }).toEqual({})
    expect(form.error.value).toBe('Changed meanwhile; reload')
    await form.submit(async () => {
      throw new Error('offline')
    })
    expect(form.error.value).toBe('offline')
  })

  it('shown paths may depend on the form (rows of a list)', async () => {
    const rows = ['a', 'b']
    const form = useFormSubmit({
      shown: (path: string) => path === 'name' || rows.some((_, i) => path.startsWith(`coefficients.${i}.`)),
    })
    await form.submit(async () => {
      throw refusal({ 'coefficients.1.source': ['Required'], 'coefficients.5.source': ['Required'] })
    })
    expect({ ...form.fieldErrors }).toEqual({ 'coefficients.1.source': 'Required' })
    expect(form.error.value).toBe('Required')
    const listed = useFormSubmit({ shown: () => ['count'] })
    await listed.submit(async () => {
      throw refusal({ count: ['Enter a whole number'] })
    })
    expect(listed.fieldErrors.count).toBe('Enter a whole number')
  })

  it('checks flag all their fields at once and the save is not sent', async () => {
    const model = { materialId: null as number | null, roles: [] as string[] }
    const form = useFormSubmit({
      shown: ['materialId', 'roles'],
      check: () => ({
        materialId: !model.materialId && 'Pick the material',
        roles: !model.roles.length && 'Pick at least one role',
      }),
    })
    let sent = 0
    expect(
      await form.submit(async () => {
        sent++
      }),
    ).toBe(false)
    expect(sent).toBe(0)
    expect({ ...form.fieldErrors }).toEqual({ materialId: 'Pick the material', roles: 'Pick at least one role' })
    model.materialId = 3
    model.roles = ['member']
    expect(
      await form.submit(async () => {
        sent++
      }),
    ).toBe(true)
    expect(sent).toBe(1)
    expect({ ...form.fieldErrors }).toEqual({})
  })

  it('is busy while the save runs, refuses a second submit meanwhile, and clears old messages on the next one', async () => {
    const form = useFormSubmit({ shown: ['name'] })
    await form.submit(async () => {
      throw refusal({ name: ['Required'] }, 'name: Required')
    })
    expect(form.fieldErrors.name).toBe('Required')
    let release!: () => void
    const first = form.submit(
      () =>
        new Promise<void>((resolve) => {
          release = resolve
        }),
    )
    expect(form.busy.value).toBe(true)
    expect({ ...form.fieldErrors }).toEqual({})
    expect(await form.submit(async () => undefined)).toBe(false)
    release()
    expect(await first).toBe(true)
    expect(form.busy.value).toBe(false)
  })

  it('editing a field clears its message; reset clears everything', async () => {
    const form = useFormSubmit({ shown: ['name', 'lot'] })
    await form.submit(async () => {
      throw refusal({ name: ['Required'], lot: ['Required'], other: ['Not valid'] })
    })
    ;(form.bind('name')['onUpdate:modelValue'] as () => void)()
    expect({ ...form.fieldErrors }).toEqual({ lot: 'Required' })
    form.setError('name', 'Say why')
    expect(form.fieldErrors.name).toBe('Say why')
    form.reset()
    expect({ ...form.fieldErrors }).toEqual({})
    expect(form.error.value).toBe('')
  })
})
