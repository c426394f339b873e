import { describe, it, expect } from 'vitest'
import { fieldsToParams, rowsToParams } from '../../../src/components/chips/fab-step-form'

describe("the fab-step dialog's parameters", () => {
  it('a free value typed without a name is flagged on its row, never dropped', () => {
    // (Before: the row was filtered out and the step saved without it.)
    const r = rowsToParams([
      { key: '', value: '4000' },
      { key: 'cycles', value: '3' },
      { key: '', value: '' },
    ])
    expect(r.errors).toEqual({ 'rows.0.key': 'Name this parameter, or remove the row' })
    expect(r.params).toEqual({ cycles: 3 })
  })

  it('a free name given twice is flagged, not merged', () => {
    expect(
      rowsToParams([
        { key: 'gas', value: 'O2' },
        { key: ' gas', value: 'Ar' },
      ]).errors,
    ).toEqual({ 'rows.1.key': '“gas” is given twice' })
  })

  it('sends the filled fields of the kind and names values typed under another kind', () => {
    const r = fieldsToParams('etch', { gas: 'Cl2/Ar', rfPowerW: '100', timeS: '', spinRpm: '4000' })
    expect(r.params).toEqual({ gas: 'Cl2/Ar', rfPowerW: 100 })
    expect(r.strayed).toEqual(['spinRpm'])
  })
})
