import { datasetSubject, type AppAbility, type DatasetSubject } from '../permissions/abilities'

/**
 * Who reads a dataset's curation thread: its depositors (those who could submit it as a draft)
 * and the curators (those who could decide on it once submitted). Collaborators, editors and the
 * public do not; for them the thread does not exist. The server answers 404 by this rule and the
 * client does not ask when it fails.
 */
export function canReadCurationThread(
  ability: AppAbility,
  dataset: Omit<DatasetSubject, '__type'>,
): boolean {
  const as = (state: DatasetSubject['state']) => datasetSubject({ ...dataset, state })
  return (
    ability.can('read', datasetSubject(dataset)) &&
    (ability.can('submit', as('draft')) || ability.can('curate', as('submitted')))
  )
}
