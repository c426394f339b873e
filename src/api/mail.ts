import type { MailMessage, MailSummary } from '../../shared/types'
import { http } from './http'

export const listMail = () => http.get<{ messages: MailSummary[] }>('/mail')
export const fetchMail = (id: number) => http.get<MailMessage>(`/mail/${id}`)
