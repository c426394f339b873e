import type { SearchHit } from '../../shared/types'
import { http } from './http'

export const search = (q: string) => http.get<{ hits: SearchHit[] }>(`/search?q=${encodeURIComponent(q)}`)
