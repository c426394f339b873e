import { defineStore } from 'pinia'
import { ref } from 'vue'
import type { Chip, Wafer } from '../../shared/records'
import type { DiceInput } from '../../shared/schemas/records'
import * as api from '../api/wafers'

/** Wafers: list pages, the wafer being looked at (with its chips), registering and dicing. */
export const useWafersStore = defineStore('wafers', () => {
  const current = ref<api.WaferDetail | null>(null)
  const list = (p: api.ListParams) => api.listWafers(p)
  async function load(id: number): Promise<api.WaferDetail> {
    current.value = await api.getWafer(id)
    return current.value
  }
  const register = (input: api.WaferWrite): Promise<Wafer> => api.createWafer(input)
  async function update(id: number, input: api.WaferWrite): Promise<Wafer> {
    const w = await api.updateWafer(id, input)
    await load(id)
    return w
  }
  async function retire(id: number, reason: string): Promise<void> {
    await api.retireWafer(id, reason)
    await load(id)
  }
  async function dice(id: number, input: Omit<DiceInput, 'waferId'>): Promise<Chip[]> {
    const { chips } = await api.diceWafer(id, input)
    if (current.value?.id === id) await load(id)
    return chips
  }
  return { current, list, load, register, update, retire, dice }
})
