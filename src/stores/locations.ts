import { defineStore } from 'pinia'
import { ref } from 'vue'
import type { Location, Move } from '../../shared/records'
import type { LocationInput, MoveInput } from '../../shared/schemas/records'
import * as api from '../api/locations'
import * as movesApi from '../api/moves'
import type { ListParams } from '../api/wafers'
import { search } from '../api/search'

/** Storage tree (room › cabinet › box › slot) and moves of wafers, chips and boxes. */
export const useLocationsStore = defineStore('locations', () => {
  const all = ref<Location[]>([])
  const current = ref<Location | null>(null)
  const list = (p: ListParams) => api.listLocations(p)
  /** The whole tree (small: one page of up to 200). */
  async function fetchAll(): Promise<Location[]> {
    all.value = (await api.listLocations({ pageSize: 200, sort: 'code' })).rows
    return all.value
  }
  async function load(id: number): Promise<Location> {
    current.value = await api.getLocation(id)
    return current.value
  }
  async function create(input: LocationInput): Promise<Location> {
    const loc = await api.createLocation(input)
    await fetchAll()
    return loc
  }
  const movesOf = (itemCode: string): Promise<Move[]> => movesApi.listMoves(itemCode)
  async function move(input: MoveInput): Promise<Move> {
    const m = await movesApi.moveItem(input)
    await fetchAll()
    return m
  }
  /** People to hand an item to (any signed-in person may search people by name). */
  async function findPeople(text: string): Promise<{ value: number; label: string }[]> {
    if (text.trim().length < 2) return []
    const { hits } = await search(text.trim())
    return hits.filter((h) => h.kind === 'person').map((h) => ({ value: h.id, label: h.label }))
  }
  return { all, current, list, fetchAll, load, create, movesOf, move, findPeople }
})
