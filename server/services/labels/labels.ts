import { desc, eq } from 'drizzle-orm'
import { labelJobs, users, type User } from '../../db/schema/index'
import type { Db } from '../../db/client'
import type { ResolvedCode } from '../../../shared/records'
import { findTemplate, LABEL_TEMPLATES, type LabelTemplate } from '../../../labels/templates'
import { qrPayload } from '../../../labels/qr-payload'
import type { LabelJob, LabelJobInput, LabelRender, RenderLabelsInput } from '../../../labels/schemas'
import { BadRequestError, NotFoundError, fieldError } from '../../errors'
import { writeAudit } from '../audit/audit'
import { resolveCode } from '../search/resolve'
import { iso } from '../inventory/codes'
import { labelSvg, sheetSvgs, LabelTooSmallError, type LabelContent } from './label-svg'

/** Label templates, rendering (SVG per label and per sheet page) and recorded print jobs. */

export const listTemplates = (): LabelTemplate[] => LABEL_TEMPLATES

function templateOf(id: string): LabelTemplate {
  const t = findTemplate(id)
  if (!t) throw new NotFoundError(`No label template "${id}". Known: ${LABEL_TEMPLATES.map((x) => x.id).join(', ')}`)
  return t
}

/** Detail lines under the code, from the resolver's label ("W-0001 · LiNbO3 Z-cut · lot K-17"). */
export function detailLines(r: ResolvedCode): string[] {
  const parts = r.label.split(' · ').slice(1)
  if (r.kind === 'chip') return [`wafer W-${r.code.split('-')[1]}`, ...parts]
  if (r.kind === 'array') return [...parts, `chip C-${r.code.split('-').slice(1, 3).join('-')}`]
  // A location's path "Room › Cabinet › Box": the innermost place first, so it survives clipping.
  if (r.kind === 'location')
    return parts
      .join(' · ')
      .split(' › ')
      .reverse()
      .map((p, i) => (i ? `in ${p}` : p))
  return parts
}

/**
 * Look every code up with the same resolver as /api/resolve (any case); a 400 on `codes` names
 * every unknown one.
 */
async function resolveAll(db: Db, codes: string[]): Promise<Map<string, ResolvedCode>> {
  const unique = [...new Set(codes)]
  const found = await Promise.all(
    unique.map((c) =>
      resolveCode(db, c).catch((err) => {
        if (err instanceof NotFoundError) return null
        throw err
      }),
    ),
  )
  const unknown = unique.filter((_, i) => !found[i])
  if (unknown.length) {
    throw fieldError('codes', `No record has the code${unknown.length > 1 ? 's' : ''} ${unknown.join(', ')}`)
  }
  return new Map(unique.map((c, i) => [c, found[i]!]))
}

/** Render the labels of `codes` with one template (sheets: also the page SVGs). */
export async function renderLabels(db: Db, publicUrl: string, input: RenderLabelsInput): Promise<LabelRender> {
  const t = templateOf(input.template)
  const records = await resolveAll(db, input.codes)
  const contents: LabelContent[] = input.codes.map((c) => {
    const r = records.get(c)!
    return { code: r.code, payload: qrPayload(publicUrl, r.code), details: detailLines(r) }
  })
  try {
    const labels = contents.map((c) => {
      const { svg, qr } = labelSvg(t.label, t.ecc, c)
      return {
        code: c.code,
        payload: c.payload,
        symbol: `${qr.version}-${t.ecc}`,
        moduleMm: Number(qr.moduleMm.toFixed(4)),
        svg,
      }
    })
    const sheets = t.sheet ? sheetSvgs(t.sheet, t.label, t.ecc, contents, input.skip) : []
    return { template: t.id, labels, sheets }
  } catch (err) {
    if (err instanceof LabelTooSmallError) throw fieldError('template', err.message)
    throw err
  }
}

/** Record that labels were printed (who, when, which template and codes), with an audit row. */
export async function recordLabelJob(db: Db, actor: User, input: LabelJobInput): Promise<LabelJob> {
  templateOf(input.template)
  const records = await resolveAll(db, input.codes)
  const codes = input.codes.map((c) => records.get(c)!.code)
  const id = await db.transaction(async (tx) => {
    const [{ id: jobId }] = await tx
      .insert(labelJobs)
      .values({ template: input.template, codes, createdBy: actor.id })
      .$returningId()
    await writeAudit(tx, {
      userId: actor.id,
      entity: 'label_job',
      entityId: jobId,
      action: 'create',
      changes: { template: { from: null, to: input.template }, codes: { from: null, to: codes } },
      reason: `printed ${codes.length} label${codes.length > 1 ? 's' : ''}`,
    })
    return jobId
  })
  const [job] = await listLabelJobs(db, 1, id)
  if (!job) throw new BadRequestError('The print job was not saved')
  return job
}

/** Recent print jobs, newest first (or the one job `onlyId`). */
export async function listLabelJobs(db: Db, limit = 20, onlyId?: number): Promise<LabelJob[]> {
  const rows = await db
    .select({ j: labelJobs, name: users.name })
    .from(labelJobs)
    .innerJoin(users, eq(users.id, labelJobs.createdBy))
    .where(onlyId ? eq(labelJobs.id, onlyId) : undefined)
    .orderBy(desc(labelJobs.id))
    .limit(limit)
  return rows.map(({ j, name }) => ({
    id: j.id,
    template: j.template,
    codes: j.codes,
    createdBy: { id: j.createdBy, name },
    createdAt: iso(j.createdAt)!,
  }))
}
