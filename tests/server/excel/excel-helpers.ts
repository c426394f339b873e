import ExcelJS from 'exceljs'
import { sql } from 'drizzle-orm'
import type TestAgent from 'supertest/lib/agent'
import type { ExportJob } from '../../../shared/excel'
import { startTestApp, signedInAs } from '../helpers'

/** Helpers of the Excel tests: run an export to the end, read a downloaded workbook, upload a file. */
export function binary(
  res: NodeJS.ReadableStream & { setEncoding: (e: string) => void; on: (e: string, f: (c?: unknown) => void) => void },
  cb: (err: Error | null, body: Buffer) => void,
) {
  const parts: Buffer[] = []
  res.on('data', (c) => parts.push(c as Buffer))
  res.on('end', () => cb(null, Buffer.concat(parts)))
}

export async function runExport(agent: TestAgent): Promise<{ job: ExportJob; book: ExcelJS.Workbook; bytes: Buffer }> {
  const start = await agent.post('/api/excel/exports').send({})
  if (start.status !== 202) throw new Error(`export start: ${start.status} ${JSON.stringify(start.body)}`)
  let job = start.body as ExportJob
  for (let i = 0; i < 600 && !['done', 'failed'].includes(job.phase); i++) {
    await new Promise((r) => setTimeout(r, 100))
    job = (await agent.get(`/api/excel/exports/${job.id}`)).body
  }
  if (job.phase !== 'done') throw new Error(`export: ${JSON.stringify(job)}`)
  const dl = await agent
    .get(`/api/excel/exports/${job.id}/download`)
    .buffer(true)
    .parse(binary as never)
  const book = new ExcelJS.Workbook()
  await book.xlsx.load(dl.body as ArrayBuffer)
  return { job, book, bytes: dl.body as Buffer }
}

export async function toBuffer(book: ExcelJS.Workbook): Promise<Buffer> {
  return Buffer.from(await book.xlsx.writeBuffer())
}

export function upload(agent: TestAgent, bytes: Buffer, dryRun: boolean, name = 'legacy.xlsx') {
  return agent.post(`/api/excel/import?dryRun=${dryRun}`).attach('file', bytes, name)
}

/** The app of an import test, with a signed-in group lead (who imports) and fab technician, and the lead's id. */
export async function startImportTestApp(env: Record<string, string> = {}) {
  const t = await startTestApp(env)
  const lead = await signedInAs(t.app, 'group_lead')
  const fab = await signedInAs(t.app, 'fab_technician')
  const me = (await lead.get('/api/auth/me')).body
  const leadId: number = me.user?.id ?? me.id
  /**
   * Rows of the record tables, and the group lead's audit rows on them: a refused import must leave
   * them all unchanged (the shared DB sees other people's activity, hence the audit filter).
   */
  async function counts() {
    const [rows] = (await t.db
      .execute(sql`SELECT (SELECT count(*) FROM wafers) w, (SELECT count(*) FROM chips) c, (SELECT count(*) FROM arrays) a,
      (SELECT count(*) FROM audit_log WHERE user_id = ${leadId} AND entity IN ('wafer', 'chip', 'array')) l`)) as unknown as [
      Record<string, number>[],
    ]
    return rows[0]
  }
  return { t, lead, fab, leadId, counts }
}

/** A workbook of the given sheets (header row, then rows), each visible unless `state` says otherwise. */
export function workbookOf(
  sheets: Record<string, (ExcelJS.CellValue | object)[][]>,
  state: Record<string, ExcelJS.WorksheetState> = {},
): ExcelJS.Workbook {
  const book = new ExcelJS.Workbook()
  for (const [name, rows] of Object.entries(sheets))
    book.addWorksheet(name, { state: state[name] ?? 'visible' }).addRows(rows as ExcelJS.CellValue[][])
  return book
}
