import { z } from 'zod'
import { LABEL_TEMPLATES } from './templates'

/**
 * Request schemas and response shapes of /api/labels, used by the server routes and the client.
 * (They live beside the templates because labels/ is the one folder both sides share for labels.)
 */

const templateIds = LABEL_TEMPLATES.map((t) => t.id) as [string, ...string[]]
export const templateIdSchema = z.enum(templateIds, { error: `Pick a template: ${templateIds.join(', ')}` })

const codeSchema = z.string().trim().toUpperCase().min(1, 'Empty code').max(40, 'A code has at most 40 characters')
export const codesSchema = z.array(codeSchema).min(1, 'Pick at least one record').max(300, 'At most 300 labels at once')

export const renderLabelsSchema = z.object({
  template: templateIdSchema,
  codes: codesSchema,
  /** Sheets only: skip this many cells (already used on a partly used sheet). */
  skip: z.coerce.number().int().min(0).max(29, 'A sheet has 30 cells').default(0),
})
export type RenderLabelsInput = z.infer<typeof renderLabelsSchema>

export const labelJobSchema = z.object({ template: templateIdSchema, codes: codesSchema })
export type LabelJobInput = z.infer<typeof labelJobSchema>

/** One rendered label. */
export interface RenderedLabel {
  code: string
  /** What the QR encodes. */
  payload: string
  /** e.g. "2-M" (version 2, level M). */
  symbol: string
  moduleMm: number
  svg: string
}
export interface LabelRender {
  template: string
  labels: RenderedLabel[]
  /** Sheet templates: one SVG per page with the labels placed in the grid. */
  sheets: string[]
}
export interface LabelJob {
  id: number
  template: string
  codes: string[]
  createdBy: { id: number; name: string }
  createdAt: string
}
