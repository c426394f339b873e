import { defineStore } from 'pinia'
import { ref } from 'vue'
import type { BarePatternInput, FitRequest, SpectrumRequest } from '../../shared/schemas/analysis'
import * as api from '../api/analysis'

/** Measurement analysis: predicted patterns, the open session's fit and spectrum answers, saved analyses. */
export const useAnalysisStore = defineStore('analysis', () => {
  const fit = ref<api.FitAnswer | null>(null)
  const spectrum = ref<api.SpectrumAnswer | null>(null)
  const saved = ref<api.SavedAnalysis[]>([])

  const arrayPatterns = (id: number) => Promise.all([api.arrayPattern(id, 2), api.arrayPattern(id, 3)])
  const chipPatterns = (id: number) => Promise.all([api.chipPattern(id, 2), api.chipPattern(id, 3)])
  const barePattern = (input: Partial<BarePatternInput>) => api.barePattern(input)
  const sheet = (kind: 'array' | 'chip', id: number) => (kind === 'array' ? api.arraySheet(id) : api.chipSheet(id))

  async function fetchSaved(sessionId: number): Promise<void> {
    saved.value = await api.listAnalyses(sessionId)
  }
  async function runFit(sessionId: number, input: Partial<FitRequest>): Promise<api.FitAnswer> {
    fit.value = await api.fitSweep(sessionId, input)
    if (input.save) await fetchSaved(sessionId)
    return fit.value
  }
  async function runSpectrum(sessionId: number, input: Partial<SpectrumRequest>): Promise<api.SpectrumAnswer> {
    spectrum.value = await api.analyseSpectrum(sessionId, input)
    if (input.record) await fetchSaved(sessionId)
    return spectrum.value
  }
  function reset(): void {
    fit.value = null
    spectrum.value = null
    saved.value = []
  }

  return {
    fit,
    spectrum,
    saved,
    arrayPatterns,
    chipPatterns,
    barePattern,
    sheet,
    fetchSaved,
    runFit,
    runSpectrum,
    reset,
  }
})

/** Everything a printable sample sheet shows, loaded through the records' own routes plus the analysis routes. */
export async function loadSampleSheet(kind: 'array' | 'chip', id: number) {
  const [{ getArray }, { getChip }] = await Promise.all([import('../api/arrays'), import('../api/chips')])
  const store = useAnalysisStore()
  const sessions = await store.sheet(kind, id)
  const arrays = await Promise.all(sessions.map((s) => getArray(s.id)))
  const chipId = kind === 'chip' ? id : arrays[0].chip.id
  const [chip, patterns] = await Promise.all([
    getChip(chipId),
    kind === 'array' ? store.arrayPatterns(id) : store.chipPatterns(id),
  ])
  return {
    chip,
    arrays: arrays.map((a) => ({ array: a, sessions: sessions.find((s) => s.id === a.id)?.sessions ?? [] })),
    patterns,
  }
}
