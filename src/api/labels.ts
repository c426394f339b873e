import type { LabelTemplate } from '../../labels/templates'
import type { LabelJob, LabelJobInput, LabelRender, RenderLabelsInput } from '../../labels/schemas'
import type { Move, ResolvedCode } from '../../shared/records'
import type { MoveInput } from '../../shared/schemas/records'
import { http } from './http'

/** Labels (templates, rendering, print jobs) and what scanning needs (code resolver, moves). */
export const listTemplates = () => http.get<{ templates: LabelTemplate[] }>('/labels/templates')
export const renderLabels = (input: Partial<RenderLabelsInput> & Pick<RenderLabelsInput, 'template' | 'codes'>) =>
  http.post<LabelRender>('/labels/render', input)
export const recordLabelJob = (input: LabelJobInput) => http.post<LabelJob>('/labels/jobs', input)
export const listLabelJobs = () => http.get<{ jobs: LabelJob[] }>('/labels/jobs')
/** Same-origin URL of one label as an SVG file (Content-Disposition: attachment). */
export const labelDownloadUrl = (template: string, code: string) =>
  `/api/labels/${encodeURIComponent(template)}/${encodeURIComponent(code)}.svg`

export const resolveCode = (code: string) => http.get<ResolvedCode>(`/resolve/${encodeURIComponent(code)}`)
export const moveItem = (input: Pick<MoveInput, 'itemCode' | 'toLocationId'> & { note?: string }) =>
  http.post<Move>('/moves', input)
