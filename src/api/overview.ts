import type { Overview } from '../../shared/overview'
import { http } from './http'

export const fetchOverview = () => http.get<Overview>('/overview')
