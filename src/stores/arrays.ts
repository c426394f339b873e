import { defineStore } from 'pinia'
import { ref } from 'vue'
import type { ArrayRecord } from '../../shared/records'
import type { ArrayInput } from '../../shared/schemas/records'
import * as api from '../api/arrays'
import type { ListParams } from '../api/wafers'

/** Nanostructure arrays: list pages, the array being looked at (symmetry, channels), recomputing. */
export const useArraysStore = defineStore('arrays', () => {
  const current = ref<ArrayRecord | null>(null)
  const list = (p: ListParams) => api.listArrays(p)
  async function load(id: number): Promise<ArrayRecord> {
    current.value = await api.getArray(id)
    return current.value
  }
  const create = (input: ArrayInput): Promise<ArrayRecord> => api.createArray(input)
  async function update(id: number, input: ArrayInput): Promise<ArrayRecord> {
    current.value = await api.updateArray(id, input)
    return current.value
  }
  async function retire(id: number, reason: string): Promise<void> {
    current.value = await api.retireArray(id, reason)
  }
  async function recompute(id: number): Promise<void> {
    current.value = await api.recomputeArray(id)
  }
  /** Recompute every stale array in one server call; counts come back when done. */
  const recomputeStale = () => api.recomputeArrays({ staleOnly: true })
  return { current, list, load, create, update, retire, recompute, recomputeStale }
})
