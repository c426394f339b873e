import type { StoredFile } from '../../shared/records'
import type { FileUploadInput } from '../../shared/schemas/measurements'
import type { ApiErrorBody } from '../../shared/types'
import { ApiError, http } from './http'
import { toQueryString } from './sessions'

/** Points of a CSV data table (first two columns), for plots. */
export interface TablePreview {
  columns: string[]
  points: [number, number][]
  skipped: number
}

export const listFiles = (entity: FileUploadInput['entity'], entityId: number) =>
  http.get<StoredFile[]>(`/files?${toQueryString({ entity, entityId })}`)
export const getTablePreview = (id: number) => http.get<TablePreview>(`/files/${id}/preview`)
export const retireFile = (id: number, reason: string) => http.post<StoredFile>(`/files/${id}/retire`, { reason })
export const fileDownloadUrl = (id: number) => `/api/files/${id}/download`
export const filePreviewUrl = (id: number) => `/api/files/${id}/preview`

/**
 * Multipart upload with progress. fetch() cannot report upload progress, so this one request uses
 * XMLHttpRequest; answers are turned into ApiError exactly as http.ts does (field errors on `file`, `kind` …).
 */
export function uploadFile(
  input: FileUploadInput,
  file: File,
  onProgress: (fraction: number) => void,
): Promise<StoredFile> {
  const body = new FormData()
  body.set('entity', input.entity)
  body.set('entityId', String(input.entityId))
  body.set('kind', input.kind)
  body.set('file', file, file.name)
  return new Promise((resolve, reject) => {
    const xhr = new XMLHttpRequest()
    xhr.open('POST', '/api/files')
    xhr.setRequestHeader('Accept', 'application/json')
    xhr.upload.onprogress = (e) => {
      if (e.lengthComputable) onProgress(e.loaded / e.total)
    }
    xhr.onerror = () =>
      reject(
        new ApiError(0, {
          error: 'network',
          message: 'The Overtone server cannot be reached. Check the network and try again.',
        }),
      )
    xhr.onload = () => {
      let data: unknown = {}
      try {
        data = JSON.parse(xhr.responseText)
      } catch {
        /* empty or non-JSON body */
      }
      if (xhr.status >= 200 && xhr.status < 300) resolve(data as StoredFile)
      else reject(new ApiError(xhr.status, (data ?? {}) as Partial<ApiErrorBody>))
    }
    xhr.send(body)
  })
}
