import { http } from './http'
import type { PolarResponse } from '../../shared/engine'

export type { PolarResponse }

/** Rotational-anisotropy pattern at oblique incidence (POST /api/polar; request: shared/engine/polar.ts). */
export const computePolarPattern = (request: unknown) => http.post<PolarResponse>('/polar', request)
