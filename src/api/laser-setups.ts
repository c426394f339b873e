import type { ApprovalCheck, LaserSetup, Page, PersonRef } from '../../shared/records'
import type { LaserSetupInput } from '../../shared/schemas/records'
import type { SetupFigures } from '../../shared/laser-figures'
import type { MpeEdition } from '../../shared/laser-safety'
import { http } from './http'
import { toQueryString } from './sessions'

/** Every laser-setup answer carries the laser caution sentence. */
type WithCaution<T> = T & { caution: string }

export interface SignoffHistoryEntry {
  decision: 'approved' | 'rejected' | 'revoked' | 'voided'
  by: PersonRef
  at: string
  expiresOn: string | null
  note: string | null
}
/**
 * The detail: sign-off with its history, whether the reader may approve it, what it lacks to be submitted, and the
 * computed hazard figures.
 */
export type LaserSetupDetail = WithCaution<
  Omit<LaserSetup, 'signoff'> & {
    signoff: LaserSetup['signoff'] & { history: SignoffHistoryEntry[] }
    approval: ApprovalCheck
    missingForSubmit: Record<string, string[]>
    computed: SetupFigures
  }
>
/** The safety officers' queue; each setup says whether the reader may approve (renew) it and why not. */
export type QueuedSetup = LaserSetup & { approval: ApprovalCheck }
export interface SignoffQueue {
  waiting: QueuedSetup[]
  expiring: QueuedSetup[]
  expired: QueuedSetup[]
  caution: string
}
export interface FiguresParams {
  edition?: MpeEdition
  spotUm?: number
  exposureS?: number
}

export interface LaserSetupListParams {
  page: number
  pageSize: number
  sort?: string
  dir?: 'asc' | 'desc'
  q?: string
  includeRetired?: boolean
}

export const listLaserSetups = (p: LaserSetupListParams) =>
  http.get<WithCaution<Page<LaserSetup>>>(`/laser-setups?${toQueryString(p)}`)
export const getLaserSetup = (id: number, p: FiguresParams = {}) =>
  http.get<LaserSetupDetail>(`/laser-setups/${id}?${toQueryString(p as Record<string, unknown>)}`)
export const createLaserSetup = (input: LaserSetupInput) => http.post<LaserSetupDetail>('/laser-setups', input)
export const updateLaserSetup = (id: number, input: Partial<LaserSetupInput> & { reason?: string | null }) =>
  http.patch<LaserSetupDetail>(`/laser-setups/${id}`, input)
export const retireLaserSetup = (id: number, reason: string) =>
  http.post<WithCaution<LaserSetup>>(`/laser-setups/${id}/retire`, { reason })
export const getSignoffQueue = () => http.get<SignoffQueue>('/laser-setups/queue')
export const submitLaserSetup = (id: number) => http.post<LaserSetupDetail>(`/laser-setups/${id}/submit`, {})
export const approveLaserSetup = (id: number, expiresOn: string, note: string | null) =>
  http.post<LaserSetupDetail>(`/laser-setups/${id}/approve`, { expiresOn, note })
export const rejectLaserSetup = (id: number, note: string) =>
  http.post<LaserSetupDetail>(`/laser-setups/${id}/reject`, { note })
export const revokeLaserSetup = (id: number, note: string) =>
  http.post<LaserSetupDetail>(`/laser-setups/${id}/revoke`, { note })
