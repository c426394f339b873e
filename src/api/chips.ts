import type { ArrayRow, Chip, FabStep, Page } from '../../shared/records'
import type { FabStepInput } from '../../shared/schemas/records'
import { http } from './http'
import { listQuery, type ListParams } from './wafers'

export type ChipDetail = Chip & { arrays: ArrayRow[]; fabSteps: FabStep[] }
export interface ChipUpdate {
  rotationDeg?: number
  widthMm?: number
  heightMm?: number
  status?: Chip['status']
  notes?: string | null
  reason?: string | null
}

export const listChips = (p: ListParams) => http.get<Page<Chip>>(`/chips${listQuery(p)}`)
export const getChip = (id: number) => http.get<ChipDetail>(`/chips/${id}`)
export const updateChip = (id: number, input: ChipUpdate) => http.patch<Chip>(`/chips/${id}`, input)
export const retireChip = (id: number, reason: string) => http.post<Chip>(`/chips/${id}/retire`, { reason })
export const listFabSteps = (chipId: number) => http.get<FabStep[]>(`/chips/${chipId}/fab-steps`)
export const addFabStep = (chipId: number, input: Omit<FabStepInput, 'chipId'>) =>
  http.post<FabStep>(`/chips/${chipId}/fab-steps`, input)
