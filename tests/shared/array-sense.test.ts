import { describe, it, expect } from 'vitest'
import { arraySenseIssues, type ArrayGeometry } from '../../shared/array-sense'
import { arraySchema } from '../../shared/schemas/records'

const base = (g: Partial<ArrayGeometry>): ArrayGeometry => ({
  shape: 'disk',
  dimensionsNm: { diameterNm: 200 },
  shapeAzimuthDeg: 0,
  lattice: 'square',
  periodXNm: 400,
  periodYNm: null,
  customRotationOrder: null,
  customMirrors: null,
  ...g,
})
const paths = (g: Partial<ArrayGeometry>) => arraySenseIssues(base(g)).map((i) => i.path)

describe('array geometry that cannot exist is refused, on the field to fix', () => {
  it('a plausible disk array passes', () => {
    expect(arraySenseIssues(base({}))).toEqual([])
  })

  it('each shape needs its dimensions', () => {
    expect(paths({ shape: 'square', dimensionsNm: {} })).toEqual(['dimensionsNm.sideNm'])
    expect(paths({ shape: 'ring', dimensionsNm: { outerDiameterNm: 300 } })).toEqual(['dimensionsNm.innerDiameterNm'])
  })

  it('a ring whose inner diameter is not smaller than its outer one', () => {
    expect(paths({ shape: 'ring', dimensionsNm: { innerDiameterNm: 320, outerDiameterNm: 300 } })).toEqual([
      'dimensionsNm.innerDiameterNm',
    ])
    expect(paths({ shape: 'ring', dimensionsNm: { innerDiameterNm: 300, outerDiameterNm: 300 } })).toEqual([
      'dimensionsNm.innerDiameterNm',
    ])
    expect(paths({ shape: 'ring', dimensionsNm: { innerDiameterNm: 150, outerDiameterNm: 300 } })).toEqual([])
  })

  it('a split ring whose gap or line width leaves no opening', () => {
    expect(paths({ shape: 'split-ring', dimensionsNm: { sideNm: 300, widthNm: 160, gapNm: 20 } })).toContain(
      'dimensionsNm.widthNm',
    )
    expect(paths({ shape: 'split-ring', dimensionsNm: { sideNm: 300, widthNm: 80, gapNm: 150 } })).toEqual([
      'dimensionsNm.gapNm',
    ])
    expect(paths({ shape: 'split-ring', dimensionsNm: { sideNm: 300, widthNm: 80, gapNm: 60 } })).toEqual([])
  })

  it('lattices need their periods; a meta-atom must fit its cell, turned by its azimuth', () => {
    expect(paths({ periodXNm: null })).toEqual(['periodXNm'])
    expect(paths({ lattice: 'rectangular', periodXNm: 400, periodYNm: null })).toEqual(['periodYNm'])
    expect(paths({ lattice: 'single', periodXNm: null })).toEqual([])
    expect(paths({ dimensionsNm: { diameterNm: 400 } })).toEqual(['periodXNm'])
    // A 380 × 100 nm bar fits a 400 nm cell along x; turned by 45° it spans 380·cos45° + 100·sin45° ≈ 339 nm along x
    // and y, too much for 330 nm.
    expect(paths({ shape: 'rectangle', dimensionsNm: { lengthNm: 380, widthNm: 100 }, periodXNm: 400 })).toEqual([])
    expect(
      paths({ shape: 'rectangle', dimensionsNm: { lengthNm: 380, widthNm: 100 }, periodXNm: 330, shapeAzimuthDeg: 45 }),
    ).toEqual(['periodXNm'])
    expect(
      paths({
        shape: 'rectangle',
        dimensionsNm: { lengthNm: 200, widthNm: 350 },
        lattice: 'rectangular',
        periodXNm: 400,
        periodYNm: 300,
      }),
    ).toEqual(['periodYNm'])
  })

  // Point groups Cn and Cnv (any group-theory text, e.g. the crystallographic point-group tables):
  // an n-fold structure has either no mirror lines (Cn) or exactly n, 180°/n apart (Cnv).
  it('mirrors that contradict the rotation order', () => {
    expect(
      paths({ shape: 'custom', dimensionsNm: {}, customRotationOrder: 4, customMirrors: [0, 45, 90, 135] }),
    ).toEqual([])
    expect(paths({ shape: 'custom', dimensionsNm: {}, customRotationOrder: 3, customMirrors: [90, 30, 150] })).toEqual(
      [],
    )
    expect(paths({ shape: 'custom', dimensionsNm: {}, customRotationOrder: 4, customMirrors: [0] })).toEqual([
      'customMirrors',
    ])
    expect(paths({ shape: 'custom', dimensionsNm: {}, customRotationOrder: 2, customMirrors: [0, 45] })).toEqual([
      'customMirrors',
    ])
    expect(paths({ shape: 'custom', dimensionsNm: {}, customRotationOrder: 1, customMirrors: [0, 180] })).toEqual([])
    expect(paths({ shape: 'custom', dimensionsNm: {}, customRotationOrder: 3, customMirrors: [] })).toEqual([])
  })

  it('the request schema carries the checks with field paths', () => {
    const r = arraySchema.safeParse({
      chipId: 1,
      position: 'B2',
      shape: 'ring',
      dimensionsNm: { innerDiameterNm: 500, outerDiameterNm: 300 },
      lattice: 'square',
      periodXNm: 600,
    })
    expect(r.success).toBe(false)
    expect(r.error!.issues[0].path).toEqual(['dimensionsNm', 'innerDiameterNm'])
    expect(r.error!.issues[0].message).toMatch(/smaller than the outer one \(300 nm\)/)
  })
})
