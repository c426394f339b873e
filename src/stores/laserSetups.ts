import { defineStore } from 'pinia'
import { ref } from 'vue'
import type { LaserSetup } from '../../shared/records'
import type { LaserSetupInput } from '../../shared/schemas/records'
import * as api from '../api/laser-setups'

/** The laser-setup list (plain register for now) and the setups a session form can pick. */
export const useLaserSetupsStore = defineStore('laserSetups', () => {
  const rows = ref<LaserSetup[]>([])
  const total = ref(0)
  const isLoading = ref(false)
  const current = ref<LaserSetup | null>(null)
  /** Setups in use, for pickers (first 200 by code). */
  const active = ref<LaserSetup[]>([])

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

  async function fetchOne(id: number): Promise<LaserSetup> {
    current.value = await api.getLaserSetup(id)
    return current.value
  }

  async function save(id: number | null, input: LaserSetupInput): Promise<LaserSetup> {
    current.value = id === null ? await api.createLaserSetup(input) : await api.updateLaserSetup(id, input)
    return current.value
  }

  async function retire(id: number, reason: string): Promise<LaserSetup> {
    current.value = await api.retireLaserSetup(id, reason)
    return current.value
  }

  return { rows, total, isLoading, current, active, fetchPage, fetchActive, fetchOne, save, retire }
})
