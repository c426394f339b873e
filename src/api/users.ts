import type { InviteInput, UpdateUserInput } from '../../shared/schemas/auth'
import type { PublicUser } from '../../shared/types'
import { http } from './http'

export const listUsers = () => http.get<{ users: PublicUser[] }>('/users')
export const inviteUser = (input: InviteInput) => http.post<{ user: PublicUser }>('/users/invite', input)
export const updateUser = (id: number, input: UpdateUserInput) =>
  http.patch<{ user: PublicUser }>(`/users/${id}`, input)
export const endSessions = (id: number, reason: string) =>
  http.post<{ ended: number }>(`/users/${id}/end-sessions`, { reason })
export const sendPasswordReset = (id: number, reason: string) =>
  http.post<void>(`/users/${id}/password-reset`, { reason })
