import type { LaserSetup, Page } from '../../shared/records'
import type { LaserSetupInput } from '../../shared/schemas/records'
import { http } from './http'
import { toQueryString } from './sessions'

/** Every laser-setup answer carries the laser caution sentence. */
type WithCaution<T> = T & { caution: string }

export interface LaserSetupListParams { page: number; pageSize: number; sort?: string; dir?: 'asc' | 'desc'; q?: string; includeRetired?: boolean }

export const listLaserSetups = (p: LaserSetupListParams) => http.get<WithCaution<Page<LaserSetup>>>(`/laser-setups?${toQueryString(p)}`)
export const getLaserSetup = (id: number) => http.get<WithCaution<LaserSetup>>(`/laser-setups/${id}`)
export const createLaserSetup = (input: LaserSetupInput) => http.post<WithCaution<LaserSetup>>('/laser-setups', input)
export const updateLaserSetup = (id: number, input: Partial<LaserSetupInput>) => http.patch<WithCaution<LaserSetup>>(`/laser-setups/${id}`, input)
export const retireLaserSetup = (id: number, reason: string) => http.post<WithCaution<LaserSetup>>(`/laser-setups/${id}/retire`, { reason })
