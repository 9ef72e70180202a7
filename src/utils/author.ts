import type { AuthorDto } from '@shared/schemas/region.schema'

/**
 * The one place the client words an author. The server decides what a reader may know (null
 * under anonymous review); this only says it.
 */
export const authorLabel = (author: AuthorDto): string => author?.name || 'Anonymous'
