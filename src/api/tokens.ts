import type { CreatedTokenDto, CreateTokenInput, TokenDto } from '@shared/schemas/token.schema'
import { api } from './client'

export const listTokens = () => api.get<{ items: TokenDto[] }>('/api/me/tokens')
export const createToken = (body: CreateTokenInput) =>
  api.post<CreatedTokenDto>('/api/me/tokens', body)
export const revokeToken = (id: number) => api.delete(`/api/me/tokens/${id}`)
