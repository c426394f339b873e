import type { Material, MaterialDetail, Page } from '../../shared/records'
import type { MaterialInput } from '../../shared/schemas/records'
import { http } from './http'
import { listQuery, type ListParams } from './wafers'

export const listMaterials = (p: ListParams) => http.get<Page<Material>>(`/materials${listQuery(p)}`)
export const getMaterial = (id: number) => http.get<MaterialDetail>(`/materials/${id}`)
export const createMaterial = (input: MaterialInput) => http.post<MaterialDetail>('/materials', input)
export const updateMaterial = (id: number, input: MaterialInput) =>
  http.patch<MaterialDetail>(`/materials/${id}`, input)
export const retireMaterial = (id: number, reason: string) =>
  http.post<MaterialDetail>(`/materials/${id}/retire`, { reason })
