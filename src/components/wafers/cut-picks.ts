import { getPointGroup } from '../../../shared/engine'

type Vec3 = [number, number, number]

/** Quick picks for a wafer's cut normal and primary-flat direction (Miller indices for cubic crystals). */
export interface Pick {
  label: string
  v: Vec3
}

export function isCubicGroup(pointGroup: string | undefined): boolean {
  try {
    return pointGroup ? getPointGroup(pointGroup).isCubic : false
  } catch {
    return false
  }
}

export function cutPicks(isCubic: boolean): Pick[] {
  return isCubic
    ? [
        { label: '(001)', v: [0, 0, 1] },
        { label: '(111)', v: [1, 1, 1] },
        { label: '(110)', v: [1, 1, 0] },
      ]
    : [
        { label: 'X-cut', v: [1, 0, 0] },
        { label: 'Y-cut', v: [0, 1, 0] },
        { label: 'Z-cut', v: [0, 0, 1] },
      ]
}

const dot = (a: readonly number[], b: readonly number[]) => a[0] * b[0] + a[1] * b[1] + a[2] * b[2]
const CANDIDATES: Pick[] = [
  { label: '[110]', v: [1, 1, 0] },
  { label: '[1-10]', v: [1, -1, 0] },
  { label: '[100]', v: [1, 0, 0] },
  { label: '[010]', v: [0, 1, 0] },
  { label: '[001]', v: [0, 0, 1] },
  { label: '[11-2]', v: [1, 1, -2] },
  { label: '[-110]', v: [-1, 1, 0] },
]
const AXES: Pick[] = [
  { label: 'X [100]', v: [1, 0, 0] },
  { label: 'Y [010]', v: [0, 1, 0] },
  { label: 'Z [001]', v: [0, 0, 1] },
]

/** Flat directions that lie in the cut plane (perpendicular to the normal). */
export function flatPicks(isCubic: boolean, normal: readonly number[]): Pick[] {
  return (isCubic ? CANDIDATES : AXES).filter((p) => Math.abs(dot(p.v, normal)) < 1e-9).slice(0, 4)
}

/** normal × flat: the in-plane direction perpendicular to the flat. */
export const cross = (a: readonly number[], b: readonly number[]): Vec3 => [
  a[1] * b[2] - a[2] * b[1],
  a[2] * b[0] - a[0] * b[2],
  a[0] * b[1] - a[1] * b[0],
]
