import type { Page } from '../../shared/records'
import type { AuditRow } from '../../shared/audit'
import { http } from './http'
import { listQuery, type ListParams } from './wafers'

/** The audit trail: one record's history (anyone who reads the record) and the search (group leads). */
export const recordHistory = (entity: string, id: number) =>
  http.get<AuditRow[]>(`/audit/records/${encodeURIComponent(entity)}/${id}`)
export const searchAudit = (p: ListParams) => http.get<Page<AuditRow>>(`/audit/search${listQuery(p)}`)
