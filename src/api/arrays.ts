import type { ArrayRecord, ArrayRow, Page } from '../../shared/records'
import type { ArrayInput } from '../../shared/schemas/records'
import { http } from './http'
import { listQuery, type ListParams } from './wafers'

export const listArrays = (p: ListParams) => http.get<Page<ArrayRow>>(`/arrays${listQuery(p)}`)
export const getArray = (id: number) => http.get<ArrayRecord>(`/arrays/${id}`)
export const createArray = (input: ArrayInput) => http.post<ArrayRecord>(`/chips/${input.chipId}/arrays`, input)
export const updateArray = (id: number, input: ArrayInput) => http.patch<ArrayRecord>(`/arrays/${id}`, input)
export const retireArray = (id: number, reason: string) => http.post<ArrayRecord>(`/arrays/${id}/retire`, { reason })
export const recomputeArray = (id: number) => http.post<ArrayRecord>(`/arrays/${id}/recompute`)
export const recomputeArrays = (opts: { ids?: number[]; staleOnly?: boolean }) =>
  http.post<{ checked: number; recomputed: number }>('/arrays/recompute', opts)
