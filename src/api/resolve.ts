import type { ResolvedCode } from '../../shared/records'
import { http } from './http'

export const resolveCode = (code: string) => http.get<ResolvedCode>(`/resolve/${encodeURIComponent(code.trim())}`)
