import type { Move } from '../../shared/records'
import type { MoveInput } from '../../shared/schemas/records'
import { http } from './http'

export const listMoves = (itemCode: string) => http.get<Move[]>(`/moves?itemCode=${encodeURIComponent(itemCode)}`)
export const moveItem = (input: MoveInput) => http.post<Move>('/moves', input)
