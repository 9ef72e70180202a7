import type { MeDto } from '@shared/schemas/user.schema'
import { api } from './client'

export const fetchMe = () => api.get<MeDto>('/api/me')
