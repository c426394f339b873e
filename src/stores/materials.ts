import { defineStore } from 'pinia'
import { ref } from 'vue'
import type { MaterialDetail } from '../../shared/records'
import type { MaterialInput } from '../../shared/schemas/records'
import * as api from '../api/materials'
import type { ListParams } from '../api/wafers'

/** Materials: server-side list pages and the one material being looked at (with its d-matrix form). */
export const useMaterialsStore = defineStore('materials', () => {
  const current = ref<MaterialDetail | null>(null)
  const list = (p: ListParams) => api.listMaterials(p)
  async function load(id: number): Promise<MaterialDetail> {
    current.value = await api.getMaterial(id)
    return current.value
  }
  async function save(input: MaterialInput, id?: number): Promise<MaterialDetail> {
    const saved = id ? await api.updateMaterial(id, input) : await api.createMaterial(input)
    if (current.value?.id === saved.id || id) current.value = saved
    return saved
  }
  async function retire(id: number, reason: string): Promise<void> {
    current.value = await api.retireMaterial(id, reason)
  }
  return { current, list, load, save, retire }
})
