import type { CaughtMailDto } from '@shared/schemas/audit.schema'
import { api } from './client'

export type { CaughtMailDto }

export const listCaughtMail = () => api.get<{ items: CaughtMailDto[] }>('/api/dev/mail')
