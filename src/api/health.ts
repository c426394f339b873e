import type { HealthStatus } from '../../shared/types'
import { http } from './http'

export const fetchHealth = () => http.get<HealthStatus>('/health')
