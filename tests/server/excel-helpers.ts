import ExcelJS from 'exceljs'
import type TestAgent from 'supertest/lib/agent'
import type { ExportJob } from '../../shared/excel'

/** Helpers of the Excel tests: run an export to the end, read a downloaded workbook, upload a file. */
export function binary(res: NodeJS.ReadableStream & { setEncoding: (e: string) => void; on: (e: string, f: (c?: unknown) => void) => void }, cb: (err: Error | null, body: Buffer) => void) {
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
  const dl = await agent.get(`/api/excel/exports/${job.id}/download`).buffer(true).parse(binary as never)
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
