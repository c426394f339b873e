/**
 * Outlines of the meta-atom shapes for the schematic drawings, in a unit box (|x|, |y| ≤ 1, y up),
 * in the meta-atom frame the engine uses (long axes along x; triangle vertex +y; hexagon vertex +x;
 * L-shape arms +x and +y; split-ring gap on +y). Proportions follow the named dimensions when given.
 */
type Pt = [number, number]
export interface ShapeOutline {
  paths: string[]
  circles: { cx: number; cy: number; r: number }[]
}

const poly = (pts: Pt[]): string => `M${pts.map(([x, y]) => `${x.toFixed(3)},${y.toFixed(3)}`).join('L')}Z`
const ngon = (n: number, startDeg: number, r = 1): Pt[] =>
  Array.from({ length: n }, (_, k) => {
    const a = ((startDeg + (360 * k) / n) * Math.PI) / 180
    return [r * Math.cos(a), r * Math.sin(a)] as Pt
  })
const rot = (pts: Pt[], deg: number): Pt[] => {
  const a = (deg * Math.PI) / 180,
    c = Math.cos(a),
    s = Math.sin(a)
  return pts.map(([x, y]) => [x * c - y * s, x * s + y * c] as Pt)
}
const ratio = (a: number | undefined, b: number | undefined, fallback: number, min = 0.12, max = 0.95) =>
  a && b ? Math.min(max, Math.max(min, a / b)) : fallback
const circle = (r: number, cx = 0, cy = 0) => ({ cx, cy, r })

export function shapeOutline(shape: string, d: Record<string, number> = {}): ShapeOutline {
  const out: ShapeOutline = { paths: [], circles: [] }
  switch (shape) {
    case 'disk':
      out.circles.push(circle(1))
      break
    case 'ring': {
      const ri = ratio(d.innerDiameterNm, d.outerDiameterNm ?? d.diameterNm, 0.55)
      out.paths.push(`M1,0A1,1 0 1,0 -1,0A1,1 0 1,0 1,0ZM${ri},0A${ri},${ri} 0 1,1 ${-ri},0A${ri},${ri} 0 1,1 ${ri},0Z`)
      break
    }
    case 'ellipse': {
      const ry = ratio(d.widthNm, d.lengthNm, 0.55)
      out.paths.push(`M1,0A1,${ry} 0 1,0 -1,0A1,${ry} 0 1,0 1,0Z`)
      break
    }
    case 'rectangle': {
      const h = ratio(d.widthNm, d.lengthNm, 0.5)
      out.paths.push(
        poly([
          [-1, -h],
          [1, -h],
          [1, h],
          [-1, h],
        ]),
      )
      break
    }
    case 'square':
      out.paths.push(
        poly([
          [-0.8, -0.8],
          [0.8, -0.8],
          [0.8, 0.8],
          [-0.8, 0.8],
        ]),
      )
      break
    case 'triangle':
      out.paths.push(poly(ngon(3, 90)))
      break
    case 'hexagon':
      out.paths.push(poly(ngon(6, 0)))
      break
    case 'cross': {
      const w = ratio(d.armWidthNm, d.armLengthNm, 0.3)
      out.paths.push(
        poly([
          [-w, -1],
          [w, -1],
          [w, -w],
          [1, -w],
          [1, w],
          [w, w],
          [w, 1],
          [-w, 1],
          [-w, w],
          [-1, w],
          [-1, -w],
          [-w, -w],
        ]),
      )
      break
    }
    case 'l-shape': {
      const w = 1.6 * ratio(d.armWidthNm, d.armLengthNm, 0.28)
      out.paths.push(
        poly([
          [-0.8, -0.8],
          [0.8, -0.8],
          [0.8, -0.8 + w],
          [-0.8 + w, -0.8 + w],
          [-0.8 + w, 0.8],
          [-0.8, 0.8],
        ]),
      )
      break
    }
    case 'split-ring': {
      const t = 0.3,
        g = Math.max(0.12, Math.min(1, 1.8 * ratio(d.gapNm, d.sideNm ?? d.widthNm, 0.22)) / 2)
      out.paths.push(
        poly([
          [-g, 0.9],
          [-0.9, 0.9],
          [-0.9, -0.9],
          [0.9, -0.9],
          [0.9, 0.9],
          [g, 0.9],
          [g, 0.9 - t],
          [0.9 - t, 0.9 - t],
          [0.9 - t, -0.9 + t],
          [-0.9 + t, -0.9 + t],
          [-0.9 + t, 0.9 - t],
          [-g, 0.9 - t],
        ]),
      )
      break
    }
    case 'gammadion': {
      const w = 0.26,
        arm: Pt[] = [
          [0, -w / 2],
          [0.95, -w / 2],
          [0.95, w / 2 + 0.5],
          [0.95 - w, w / 2 + 0.5],
          [0.95 - w, w / 2],
          [0, w / 2],
        ]
      for (const a of [0, 90, 180, 270]) out.paths.push(poly(rot(arm, a)))
      break
    }
    case 'dimer': {
      const gap = ratio(d.gapNm, d.diameterNm, 0.25, 0.05, 1)
      const r = 1 / (2 + gap / 2)
      out.circles.push(circle(r, -(r + (gap * r) / 2)), circle(r, r + (gap * r) / 2))
      break
    }
    default:
      out.paths.push(
        poly([
          [0.1, 1],
          [0.9, 0.3],
          [0.6, -0.8],
          [-0.5, -0.9],
          [-1, 0.1],
          [-0.4, 0.4],
        ]),
      )
  }
  return out
}

/**
 * The named dimensions (nm) each shape asks for in the array form (shared with the Excel template and export and the
 * server's checks).
 */
export { SHAPE_DIMENSIONS } from '../../../shared/schemas/records'
