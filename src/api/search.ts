import type { PublicSearchPage, PublicSearchParams } from '@shared/schemas/public-search.schema'
import { api } from './client'

/** The public catalogue: approved datasets, searched and faceted on the server. */
export const searchPublicDatasets = (query: Partial<PublicSearchParams>) =>
  api.get<PublicSearchPage>('/api/search', { ...query })
