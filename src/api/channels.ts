import type { ChannelResponse } from '../../shared/engine'
import { http } from './http'

/** The harmonic-channel engine over HTTP; a bad request answers 400 with field paths (e.g. `crystal.normal`). */
export const computeChannels = (request: unknown) => http.post<ChannelResponse>('/channels', request)
