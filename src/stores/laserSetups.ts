import { defineStore } from 'pinia'
import { ref } from 'vue'
import type { LaserSetup } from '../../shared/records'
import type { LaserSetupInput } from '../../shared/schemas/records'
import * as api from '../api/laser-setups'

export type SignoffDecision = 'approve' | 'reject' | 'revoke'

/**
 * The laser-safety register: list, detail with figures, the sign-off queue and decisions, and the setups a session form
 * can pick.
 */
export const useLaserSetupsStore = defineStore('laserSetups', () => {
  const rows = ref<LaserSetup[]>([])
  const total = ref(0)
  const isLoading = ref(false)
  const current = ref<api.LaserSetupDetail | null>(null)
  const figuresParams = ref<api.FiguresParams>({})
  /** Setups in use, for pickers (first 200 by code), with their sign-off state. */
  const active = ref<LaserSetup[]>([])
  const queue = ref<api.SignoffQueue | null>(null)

  async function fetchPage(params: api.LaserSetupListParams): Promise<void> {
    isLoading.value = true
    try {
      const page = await api.listLaserSetups(params)
      rows.value = page.rows
      total.value = page.total
    } finally {
      isLoading.value = false
    }
  }

  async function fetchActive(): Promise<LaserSetup[]> {
    active.value = (await api.listLaserSetups({ page: 1, pageSize: 200, sort: 'code' })).rows
    return active.value
  }

  async function fetchOne(id: number, params: api.FiguresParams = figuresParams.value): Promise<api.LaserSetupDetail> {
    figuresParams.value = params
    current.value = await api.getLaserSetup(id, params)
    return current.value
  }

  async function save(
    id: number | null,
    input: Partial<LaserSetupInput> & { reason?: string | null },
  ): Promise<api.LaserSetupDetail> {
    const saved =
      id === null ? await api.createLaserSetup(input as LaserSetupInput) : await api.updateLaserSetup(id, input)
    return (current.value = id === null ? saved : await api.getLaserSetup(id, figuresParams.value))
  }

  /** The author submits a draft for sign-off (400 with the missing fields when it is not complete). */
  async function submit(id: number): Promise<api.LaserSetupDetail> {
    await api.submitLaserSetup(id)
    return fetchOne(id)
  }

  async function retire(id: number, reason: string): Promise<void> {
    await api.retireLaserSetup(id, reason)
    await fetchOne(id)
  }

  async function fetchQueue(): Promise<api.SignoffQueue> {
    return (queue.value = await api.getSignoffQueue())
  }

  async function decide(
    id: number,
    decision: SignoffDecision,
    note: string | null,
    expiresOn?: string,
  ): Promise<api.LaserSetupDetail> {
    const answer =
      decision === 'approve'
        ? await api.approveLaserSetup(id, expiresOn ?? '', note)
        : decision === 'reject'
          ? await api.rejectLaserSetup(id, note ?? '')
          : await api.revokeLaserSetup(id, note ?? '')
    if (current.value?.id === id) current.value = await api.getLaserSetup(id, figuresParams.value)
    return answer
  }

  return {
    rows,
    total,
    isLoading,
    current,
    active,
    queue,
    fetchPage,
    fetchActive,
    fetchOne,
    save,
    submit,
    retire,
    fetchQueue,
    decide,
  }
})
