import type { AdminUserDto, SetUserActiveInput } from '@shared/schemas/admin-user.schema'
import type { Page } from '@shared/schemas/common.schema'
import type { SiteRole } from '@shared/domain/roles'
import { api } from './client'

export type { AdminUserDto }

export const listAdminUsers = (query: { search?: string; limit: number; offset: number }) =>
  api.get<Page<AdminUserDto>>('/api/users', query)

export const setSiteRole = (id: number, siteRole: SiteRole | null) =>
  api.put<AdminUserDto>(`/api/users/${id}/site-role`, { siteRole })

export const setUserActive = (id: number, body: SetUserActiveInput) =>
  api.put<AdminUserDto>(`/api/users/${id}/active`, body)
