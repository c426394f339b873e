import type { Location, Page } from '../../shared/records'
import type { LocationInput } from '../../shared/schemas/records'
import { http } from './http'
import { listQuery, type ListParams } from './wafers'

export const listLocations = (p: ListParams) => http.get<Page<Location>>(`/locations${listQuery(p)}`)
export const getLocation = (id: number) => http.get<Location>(`/locations/${id}`)
export const createLocation = (input: LocationInput) => http.post<Location>('/locations', input)
export const updateLocation = (id: number, input: LocationInput) => http.patch<Location>(`/locations/${id}`, input)
export const retireLocation = (id: number, reason: string) => http.post<Location>(`/locations/${id}/retire`, { reason })
