import type { AcceptInviteInput, ChangePasswordInput, LoginInput } from '../../shared/schemas/auth'
import type { PublicUser } from '../../shared/types'
import { http } from './http'

export interface InviteDetails {
  email: string
  name: string
}

export const login = (input: LoginInput) => http.post<{ user: PublicUser }>('/auth/login', input)
export const logout = () => http.post<void>('/auth/logout')
export const fetchMe = () => http.get<{ user: PublicUser }>('/auth/me')
export const changePassword = (input: ChangePasswordInput) => http.post<void>('/auth/password', input)
export const fetchInvite = (token: string) => http.get<InviteDetails>(`/auth/invite/${encodeURIComponent(token)}`)
export const acceptInvite = (input: AcceptInviteInput) => http.post<{ user: PublicUser }>('/auth/accept-invite', input)
