import type { BarePatternInput, FitRequest, SpectrumRequest } from '../../shared/schemas/analysis'
import { http } from './http'

/** Answer shapes of /api/analysis (see server/services/analysis*.ts). */
export interface PatternPoint {
  angleDeg: number
  parallel: number
  perpendicular: number
  none: number
}
export interface PatternAnswer {
  order: number
  azimuthDeg: number
  basis: string[]
  ratios: number[]
  points: PatternPoint[]
  assumptions: string[]
  frame: string
  model: { pointGroup: string; normal: number[]; reference: number[]; order: number }
  array?: { id: number; code: string }
  chip?: { id: number; code: string }
}
export interface FittedRatio {
  label: string
  value: number | null
  sigma: number | null
  role: 'reference' | 'fitted' | 'not-observable'
}
export interface Estimate {
  value: number
  sigma: number | null
}
export interface FitAnswer {
  kind: 'polar_fit'
  order: number
  referenceDirection: string
  sentence: string
  azimuth: { value: number; sigma: number | null; periodDeg: number; isDetermined: boolean }
  expectedAzimuthDeg: number
  deviationDeg: number
  ratios: FittedRatio[]
  scale: Estimate
  backgrounds: (Estimate & { column: string })[]
  rSquared: number | null
  dof: number
  residuals: { angleDeg: number; column: string; analyser: string; observed: number; model: number; residual: number }[]
  symmetry: { column: string; analyser: string; dataFold: number; modelFold: number; isMatch: boolean }[]
  isSymmetryMatch: boolean
  curves: { column: string; analyser: string; points: [number, number][] }[]
  sweep: {
    angleColumn: string
    angleUnit: 'deg' | 'rad'
    angleUnitReason: string
    channels: { column: string; analyser: string }[]
    skipped: { line: number; reason: string }[]
    notes: string[]
  }
  notes: string[]
  assumptions: string[]
  savedId: number | null
  arrayId: number
  arrayCode: string
  fileId: number
  fileName: string
}
export interface AnalysisFlag {
  code: string
  severity: 'warning' | 'info'
  message: string
}
export interface SpectrumAnswer {
  kind: 'spectrum_peak'
  order: number
  pumpWavelengthNm: number
  harmonicsNm: { order: number; wavelengthNm: number }[]
  peak: {
    expectedWavelengthNm: number
    peakWavelengthNm: number
    offsetNm: number
    fwhmNm: number
    height: number
    integral: number
    snr: number | null
    isDetected: boolean
    integrationWindowNm: [number, number]
    backgroundWindowsNm: [[number, number], [number, number]]
    background: { intercept: number; slopePerNm: number }
  }
  flags: AnalysisFlag[]
  channel: { arrayId: number; arrayCode: string; normalAllowed: boolean; explain: string[] } | null
  points: [number, number][]
  skipped: { line: number; reason: string }[]
  notes: string[]
  harmonicPowerW: number | null
  calibrationNeeded: boolean
  savedId: number | null
  fileId: number
  fileName: string
}
export interface SavedAnalysis {
  id: number
  sessionId: number
  arrayId: number | null
  fileId: number
  kind: 'polar_fit' | 'spectrum_peak'
  params: Record<string, unknown>
  result: FitAnswer | SpectrumAnswer
  version: string
  createdBy: { id: number; name: string }
  createdAt: string
}
export interface SheetSession {
  id: number
  code: string
  performedAt: string
  wavelengthNm: number
  harmonicOrder: number
  pump: { type: string; angle?: number; m?: number }
  avgPowerMw: number
  harmonicPowerW: number | null
  observedNormal: string
  observedM: number[]
  flags: string[]
  analyses: { id: number; kind: string; summary: string; createdAt: string }[]
}
export interface SheetArray {
  id: number
  code: string
  sessions: SheetSession[]
}

export const arrayPattern = (id: number, order: number) =>
  http.get<PatternAnswer>(`/analysis/arrays/${id}/pattern?order=${order}&step=2`)
export const chipPattern = (id: number, order: number) =>
  http.get<PatternAnswer>(`/analysis/chips/${id}/pattern?order=${order}&step=2`)
export const barePattern = (input: Partial<BarePatternInput>) => http.post<PatternAnswer>('/analysis/pattern', input)
export const fitSweep = (sessionId: number, input: Partial<FitRequest>) =>
  http.post<FitAnswer>(`/analysis/sessions/${sessionId}/fit`, input)
export const analyseSpectrum = (sessionId: number, input: Partial<SpectrumRequest>) =>
  http.post<SpectrumAnswer>(`/analysis/sessions/${sessionId}/spectrum`, input)
export const listAnalyses = (sessionId: number) => http.get<SavedAnalysis[]>(`/analysis/sessions/${sessionId}`)
export const arraySheet = (id: number) => http.get<SheetArray[]>(`/analysis/arrays/${id}/sheet`)
export const chipSheet = (id: number) => http.get<SheetArray[]>(`/analysis/chips/${id}/sheet`)
