import type { AuthorDto } from '@shared/schemas/region.schema'
import type { Actor } from '../../services'

/**
 * How an author of a region or comment is shown to the one asking: the single place that
 * decides it, for lists and event streams alike, so anonymous review (where authors are hidden
 * from the reviewer) switches it here and nowhere else.
 */
export function presentAuthor(
  _reader: Pick<Actor, 'user' | 'viewer'>,
  author: { id: number; name: string },
): AuthorDto {
  return { id: author.id, name: author.name }
}
