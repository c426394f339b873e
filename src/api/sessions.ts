import type { ArrayRow, MeasurementSession, MeasurementSessionRow, Page, SessionResult } from '../../shared/records'
import type { SessionInput } from '../../shared/schemas/records'
import type { SessionPreviewInput } from '../../shared/schemas/measurements'
import { http } from './http'

/** Query of the session list (server-side paging, sort and filters; see sessionListQuerySchema). */
export interface SessionListParams {
  page: number
  pageSize: number
  sort?: string
  dir?: 'asc' | 'desc'
  q?: string
  array?: string
  chip?: string
  laserSetupId?: number
  from?: string
  to?: string
}

/** Predicted vs observed for an unsaved session (`POST /api/sessions/preview`). */
export interface SessionPreview {
  results: Pick<SessionResult, 'arrayId' | 'arrayCode' | 'predicted' | 'flags'>[]
  derived: MeasurementSession['derived']
}

export function toQueryString(params: object): string {
  const q = new URLSearchParams()
  for (const [k, v] of Object.entries(params)) if (v !== undefined && v !== null && v !== '') q.set(k, String(v))
  return q.toString()
}

export const listSessions = (p: SessionListParams) =>
  http.get<Page<MeasurementSessionRow>>(`/sessions?${toQueryString(p)}`)
export const getSession = (id: number) => http.get<MeasurementSession>(`/sessions/${id}`)
export const createSession = (input: SessionInput) => http.post<MeasurementSession>('/sessions', input)
export const previewSession = (input: SessionPreviewInput) => http.post<SessionPreview>('/sessions/preview', input)

/**
 * Arrays for the session form's picker. The array list searches array codes; a chip code C-…
 * is searched as the prefix A-… its arrays' codes share (array codes are chip code + position).
 */
export const searchArrays = (text: string) =>
  http.get<Page<ArrayRow>>(
    `/arrays?${toQueryString({ q: text.trim().toUpperCase().replace(/^C-/, 'A-'), pageSize: 20 })}`,
  )
