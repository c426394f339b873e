import type { Chip, Page, Wafer } from '../../shared/records'
import type { DiceInput, WaferInput } from '../../shared/schemas/records'
import { http } from './http'

/** Paging, sorting and filters of a server-side list (see listQuerySchema). */
export type ListParams = Record<string, string | number | boolean | undefined | null>

/** `?page=1&pageSize=25…` without empty values. */
export function listQuery(params: ListParams): string {
  const q = new URLSearchParams()
  for (const [k, v] of Object.entries(params)) if (v !== undefined && v !== null && v !== '') q.set(k, String(v))
  const s = q.toString()
  return s ? `?${s}` : ''
}

export type WaferDetail = Wafer & { chips: Chip[] }
export type WaferWrite = Omit<WaferInput, 'status'> & { status?: WaferInput['status']; reason?: string | null }

export const listWafers = (p: ListParams) => http.get<Page<Wafer>>(`/wafers${listQuery(p)}`)
export const getWafer = (id: number) => http.get<WaferDetail>(`/wafers/${id}`)
export const createWafer = (input: WaferWrite) => http.post<Wafer>('/wafers', input)
export const updateWafer = (id: number, input: WaferWrite) => http.patch<Wafer>(`/wafers/${id}`, input)
export const retireWafer = (id: number, reason: string) => http.post<Wafer>(`/wafers/${id}/retire`, { reason })
export const diceWafer = (id: number, input: Omit<DiceInput, 'waferId'>) =>
  http.post<{ chips: Chip[] }>(`/wafers/${id}/dice`, input)
