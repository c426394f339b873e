/**
 * Physical sense of an array description: what cannot be fabricated is refused with a message on
 * the field to fix. Dimensions are in nm, in the meta-atom's own frame (x along its long axis).
 * Used by the array schema (server routes, the Excel import and the form alike).
 */

/** The named dimensions (nm) each shape needs. */
export const SHAPE_DIMENSIONS: Record<
  | 'disk'
  | 'ring'
  | 'ellipse'
  | 'rectangle'
  | 'square'
  | 'triangle'
  | 'hexagon'
  | 'cross'
  | 'l-shape'
  | 'split-ring'
  | 'gammadion'
  | 'dimer'
  | 'custom',
  { key: string; label: string }[]
> = {
  disk: [{ key: 'diameterNm', label: 'Diameter' }],
  ring: [
    { key: 'innerDiameterNm', label: 'Inner diameter' },
    { key: 'outerDiameterNm', label: 'Outer diameter' },
  ],
  ellipse: [
    { key: 'lengthNm', label: 'Long axis (x)' },
    { key: 'widthNm', label: 'Short axis (y)' },
  ],
  rectangle: [
    { key: 'lengthNm', label: 'Length (x)' },
    { key: 'widthNm', label: 'Width (y)' },
  ],
  square: [{ key: 'sideNm', label: 'Side' }],
  triangle: [{ key: 'sideNm', label: 'Side' }],
  hexagon: [{ key: 'sideNm', label: 'Side' }],
  cross: [
    { key: 'armLengthNm', label: 'Arm length' },
    { key: 'armWidthNm', label: 'Arm width' },
  ],
  'l-shape': [
    { key: 'armLengthNm', label: 'Arm length' },
    { key: 'armWidthNm', label: 'Arm width' },
  ],
  'split-ring': [
    { key: 'sideNm', label: 'Outer side' },
    { key: 'widthNm', label: 'Line width' },
    { key: 'gapNm', label: 'Gap' },
  ],
  gammadion: [
    { key: 'armLengthNm', label: 'Arm length' },
    { key: 'armWidthNm', label: 'Arm width' },
  ],
  dimer: [
    { key: 'diameterNm', label: 'Disk diameter' },
    { key: 'gapNm', label: 'Gap' },
  ],
  custom: [{ key: 'sizeNm', label: 'Overall size' }],
}

export interface ArrayGeometry {
  shape: string
  dimensionsNm: Record<string, number>
  shapeAzimuthDeg: number
  lattice: string
  periodXNm: number | null
  periodYNm: number | null
  customRotationOrder: number | null
  customMirrors: number[] | null
}
export interface SenseIssue {
  path: string
  message: string
}

const nm = (v: number) => `${Math.round(v * 10) / 10} nm`

/** Width × height (nm) of the meta-atom in its own frame, or null when the shape has no fixed outline. */
export function footprintNm(shape: string, d: Record<string, number>): [number, number] | null {
  switch (shape) {
    case 'disk':
      return [d.diameterNm, d.diameterNm]
    case 'ring':
      return [d.outerDiameterNm, d.outerDiameterNm]
    case 'ellipse':
    case 'rectangle':
      return [d.lengthNm, d.widthNm]
    case 'square':
    case 'split-ring':
      return [d.sideNm, d.sideNm]
    case 'triangle':
      return [d.sideNm, (d.sideNm * Math.sqrt(3)) / 2]
    case 'hexagon':
      return [2 * d.sideNm, Math.sqrt(3) * d.sideNm]
    case 'cross':
    case 'l-shape':
      return [d.armLengthNm, d.armLengthNm]
    case 'dimer':
      return [2 * d.diameterNm + d.gapNm, d.diameterNm]
    default:
      return null
  }
}

/** Everything that makes the description impossible; empty when it can exist. */
export function arraySenseIssues(a: ArrayGeometry): SenseIssue[] {
  const out: SenseIssue[] = []
  const d = a.dimensionsNm
  const dim = (k: string) => `dimensionsNm.${k}`
  // A custom shape describes its symmetry itself; its size is optional.
  const needed = a.shape === 'custom' ? [] : (SHAPE_DIMENSIONS[a.shape as keyof typeof SHAPE_DIMENSIONS] ?? [])
  for (const { key, label } of needed)
    if (!(d[key] > 0)) out.push({ path: dim(key), message: `A ${a.shape} needs its ${label.toLowerCase()}` })
  if (out.length) return out

  if (a.shape === 'ring' && d.innerDiameterNm >= d.outerDiameterNm)
    out.push({
      path: dim('innerDiameterNm'),
      message: `The inner diameter must be smaller than the outer one (${nm(d.outerDiameterNm)})`,
    })
  if (a.shape === 'ellipse' && d.widthNm > d.lengthNm)
    out.push({
      path: dim('widthNm'),
      message: `The short axis cannot exceed the long axis (${nm(d.lengthNm)}); swap them and turn the shape by 90°`,
    })
  if (a.shape === 'split-ring') {
    if (2 * d.widthNm >= d.sideNm)
      out.push({
        path: dim('widthNm'),
        message: `Two line widths must leave an opening: less than half the outer side (${nm(d.sideNm / 2)})`,
      })
    if (d.gapNm >= d.sideNm - 2 * d.widthNm)
      out.push({
        path: dim('gapNm'),
        message: `The gap must be smaller than the inner opening (${nm(d.sideNm - 2 * d.widthNm)})`,
      })
  }
  if (['cross', 'l-shape', 'gammadion'].includes(a.shape) && d.armWidthNm >= d.armLengthNm)
    out.push({
      path: dim('armWidthNm'),
      message: `The arm width must be smaller than the arm length (${nm(d.armLengthNm)})`,
    })

  // Periods: a lattice of copies needs its period(s).
  const needsX = ['square', 'hexagonal', 'rectangular'].includes(a.lattice)
  if (needsX && !a.periodXNm) out.push({ path: 'periodXNm', message: `A ${a.lattice} lattice needs its period` })
  if (a.lattice === 'rectangular' && !a.periodYNm)
    out.push({ path: 'periodYNm', message: 'A rectangular lattice needs its second period (y)' })

  // The meta-atom, turned by its azimuth, must fit its lattice cell (neighbours may not touch).
  const fp = footprintNm(a.shape, d)
  if (fp && needsX && a.periodXNm) {
    const t = (a.shapeAzimuthDeg * Math.PI) / 180
    const c = Math.abs(Math.cos(t)),
      s = Math.abs(Math.sin(t))
    const wx = fp[0] * c + fp[1] * s,
      wy = fp[0] * s + fp[1] * c
    const px = a.periodXNm
    const py =
      a.lattice === 'rectangular' ? (a.periodYNm ?? px) : a.lattice === 'hexagonal' ? (px * Math.sqrt(3)) / 2 : px
    // On a hexagonal lattice the neighbours along x are one period apart; the rows are √3/2 of it apart.
    if (wx >= px - 1e-9)
      out.push({
        path: 'periodXNm',
        message: `The meta-atom is ${nm(wx)} wide along x: the period must be larger, or neighbours overlap`,
      })
    else if (a.lattice !== 'hexagonal' && wy >= py - 1e-9)
      out.push({
        path: a.lattice === 'rectangular' ? 'periodYNm' : 'periodXNm',
        message: `The meta-atom is ${nm(wy)} tall along y: the period must be larger, or neighbours overlap`,
      })
  }

  // A structure with n-fold rotation has no mirror lines or exactly n of them, 180°/n apart (point groups Cn and Cnv).
  const n = a.customRotationOrder
  const mirrors = a.customMirrors ?? []
  if (n && n >= 1 && mirrors.length) {
    const lines = [...new Set(mirrors.map((m) => Math.round((((m % 180) + 180) % 180) * 1000) / 1000))].sort(
      (x, y) => x - y,
    )
    const step = 180 / n
    const spaced = lines.every((l) => {
      const k = (l - lines[0]) / step
      return Math.abs(k - Math.round(k)) < 1e-6
    })
    if (lines.length !== n || !spaced) {
      const example = Array.from({ length: n }, (_, i) => `${Math.round(i * step * 100) / 100}°`).join(', ')
      out.push({
        path: 'customMirrors',
        message: `A ${n}-fold structure has no mirror lines or exactly ${n}, ${Math.round(step * 100) / 100}° apart (e.g. ${example})`,
      })
    }
  }
  return out
}
