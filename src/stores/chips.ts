import { defineStore } from 'pinia'
import { ref } from 'vue'
import type { FabStep } from '../../shared/records'
import type { FabStepInput } from '../../shared/schemas/records'
import * as api from '../api/chips'
import type { ListParams } from '../api/wafers'

/** Chips: list pages, the chip being looked at (arrays, fab steps), status changes and fab steps. */
export const useChipsStore = defineStore('chips', () => {
  const current = ref<api.ChipDetail | null>(null)
  const list = (p: ListParams) => api.listChips(p)
  async function load(id: number): Promise<api.ChipDetail> {
    current.value = await api.getChip(id)
    return current.value
  }
  async function update(id: number, input: api.ChipUpdate): Promise<void> {
    await api.updateChip(id, input)
    await load(id)
  }
  async function retire(id: number, reason: string): Promise<void> {
    await api.retireChip(id, reason)
    await load(id)
  }
  async function addFabStep(chipId: number, input: Omit<FabStepInput, 'chipId'>): Promise<FabStep> {
    const step = await api.addFabStep(chipId, input)
    if (current.value?.id === chipId) await load(chipId)
    return step
  }
  return { current, list, load, update, retire, addFabStep, fabStepsOf: api.listFabSteps }
})
