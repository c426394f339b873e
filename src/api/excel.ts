import type { ExportJob, ImportReport } from '../../shared/excel'
import type { ApiErrorBody } from '../../shared/types'
import { ApiError, http } from './http'

/** Excel export (jobs with progress) and import (dry run, then the real import). */
export const startExport = () => http.post<ExportJob>('/excel/exports')
export const getExport = (id: string) => http.get<ExportJob>(`/excel/exports/${encodeURIComponent(id)}`)
export const exportDownloadUrl = (id: string) => `/api/excel/exports/${encodeURIComponent(id)}/download`
export const templateUrl = '/api/excel/template'

/**
 * Upload a workbook for a dry run or the import. A refused import answers 422 WITH its report, so
 * the report is returned for 200/201/422; every other non-2xx becomes an ApiError (field errors on `file`).
 */
export async function importWorkbook(
  file: File,
  dryRun: boolean,
  opts: { planHash?: string; reason?: string } = {},
): Promise<ImportReport> {
  const body = new FormData()
  if (opts.reason) body.set('reason', opts.reason)
  body.set('file', file, file.name)
  const plan = opts.planHash ? `&plan=${encodeURIComponent(opts.planHash)}` : ''
  let res: Response
  try {
    res = await fetch(`/api/excel/import?dryRun=${dryRun}${plan}`, {
      method: 'POST',
      body,
      credentials: 'same-origin',
      headers: { Accept: 'application/json' },
    })
  } catch {
    throw new ApiError(0, {
      error: 'network',
      message: 'The Overtone server cannot be reached. Check the network and try again.',
    })
  }
  const data: unknown = await res.json().catch(() => ({}))
  if (res.ok || res.status === 422) return data as ImportReport
  throw new ApiError(res.status, (data ?? {}) as Partial<ApiErrorBody>)
}
