import type { FilterQuery } from '@mikro-orm/core'
import { rulesToQuery } from '@casl/ability/extra'
import type { AppAbility, SubjectName } from '@shared/permissions/abilities'
import type { AppAction } from '@shared/permissions/actions'

/**
 * Turns the CASL rules for (action, subject) into a MikroORM filter, so list queries are narrowed
 * in the database. Returns null when nothing at all is allowed (skip the query).
 */
export function accessibleWhere<T extends object>(
  ability: AppAbility,
  action: AppAction,
  subject: Exclude<SubjectName, 'all'>,
): FilterQuery<T> | null {
  const query = rulesToQuery(ability, action, subject, (rule) =>
    rule.inverted ? { $not: rule.conditions } : rule.conditions,
  )
  if (query === null) return null
  // MikroORM rewrites the filter objects it is given; CASL's own rule objects must stay intact.
  return structuredClone(query) as FilterQuery<T>
}
