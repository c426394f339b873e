/**
 * ECharts options of the analysis plots. Polar plots: angle = pump polarisation θ from the chip's
 * reference edge (0° to the right, counter-clockwise, as seen from above), radius = intensity.
 * ECharts polar data are [radius, angle].
 */
import type { PatternPoint } from '../../api/analysis'

export const COLORS = { parallel: '#1f5f8b', perpendicular: '#c45c26', none: '#5b7f3a', data: '#333333' } as const
const NAMES = { parallel: 'analyser ∥ pump', perpendicular: 'analyser ⟂ pump', none: 'no analyser' } as const
export type Analyser = keyof typeof NAMES

export interface PolarSeries {
  name: string
  points: [number, number][]
  kind: 'line' | 'scatter'
  color: string
}

export function polarOption(series: PolarSeries[], title?: string, angleName = 'θ'): Record<string, unknown> {
  return {
    title: title ? { text: title, left: 'center', textStyle: { fontSize: 14 } } : undefined,
    legend: { bottom: 0, type: 'scroll' },
    tooltip: {
      trigger: 'item',
      formatter: (p: { seriesName: string; value: [number, number] }) =>
        `${p.seriesName}<br>${angleName} = ${p.value[1].toFixed(0)}°: ${p.value[0].toPrecision(3)}`,
    },
    polar: { center: ['50%', '48%'], radius: '68%' },
    angleAxis: {
      type: 'value',
      min: 0,
      max: 360,
      interval: 30,
      startAngle: 0,
      clockwise: false,
      axisLabel: { formatter: '{value}°' },
    },
    radiusAxis: { type: 'value', min: 0, axisLabel: { fontSize: 10 }, splitNumber: 3 },
    series: series.map((s) => ({
      type: s.kind,
      name: s.name,
      coordinateSystem: 'polar',
      data: s.points.map(([a, r]) => [r, a]),
      color: s.color,
      ...(s.kind === 'line' ? { showSymbol: false, lineStyle: { width: 2 }, smooth: false } : { symbolSize: 4 }),
    })),
  }
}

/** Predicted pattern series (normalised to the largest value) for the chosen analysers. */
export function patternSeries(points: PatternPoint[], analysers: Analyser[]): PolarSeries[] {
  const max = Math.max(1e-300, ...points.flatMap((p) => analysers.map((a) => p[a])))
  return analysers.map((a) => ({
    name: NAMES[a],
    kind: 'line',
    color: COLORS[a],
    points: points.map((p) => [p.angleDeg, p[a] / max] as [number, number]),
  }))
}

export const analyserName = (a: string) => NAMES[a as Analyser] ?? a
