import { defineStore } from 'pinia'
import { ref } from 'vue'
import type { MeasurementSession, MeasurementSessionRow } from '../../shared/records'
import type { SessionInput } from '../../shared/schemas/records'
import type { SessionPreviewInput } from '../../shared/schemas/measurements'
import * as api from '../api/sessions'

/** Measurement sessions: the list page, the open session, and the form's live preview. */
export const useSessionsStore = defineStore('sessions', () => {
  const rows = ref<MeasurementSessionRow[]>([])
  const total = ref(0)
  const isLoading = ref(false)
  const current = ref<MeasurementSession | null>(null)

  async function fetchPage(params: api.SessionListParams): Promise<void> {
    isLoading.value = true
    try {
      const page = await api.listSessions(params)
      rows.value = page.rows
      total.value = page.total
    } finally {
      isLoading.value = false
    }
  }

  async function fetchOne(id: number): Promise<MeasurementSession> {
    current.value = await api.getSession(id)
    return current.value
  }

  async function create(input: SessionInput): Promise<MeasurementSession> {
    current.value = await api.createSession(input)
    return current.value
  }

  const preview = (input: SessionPreviewInput) => api.previewSession(input)
  const searchArrays = async (text: string) => (await api.searchArrays(text)).rows

  return { rows, total, isLoading, current, fetchPage, fetchOne, create, preview, searchArrays }
})
