import { api } from './client'

/** A message the demo mail catcher received (the server's shape for GET /api/dev/mail). */
export interface CaughtMailDto {
  id: number
  to: string[]
  from: string
  subject: string
  text: string
  receivedAt: string
}

export const listCaughtMail = () => api.get<{ items: CaughtMailDto[] }>('/api/dev/mail')
