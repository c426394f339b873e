import { defineStore } from 'pinia'
import { ref } from 'vue'
import type { Page } from '../../shared/records'
import type { AuditRow } from '../../shared/audit'
import type { ListParams } from '../api/wafers'
import * as api from '../api/audit'

/** Audit trail: histories of records (cached per record) and the group leads' search. */
export const useAuditStore = defineStore('audit', () => {
  const histories = ref<Record<string, AuditRow[]>>({})
  async function loadHistory(entity: string, id: number): Promise<AuditRow[]> {
    const rows = await api.recordHistory(entity, id)
    histories.value[`${entity}:${id}`] = rows
    return rows
  }
  const search = (p: ListParams): Promise<Page<AuditRow>> => api.searchAudit(p)
  return { histories, loadHistory, search }
})
