import type { IDataset } from '../datasets/dataset.entity'

/** One frozen, citable version of a dataset, as the landing page lists it. */
export interface LandingVersion {
  number: number
  approvedAt: Date | null
}

/**
 * The citable versions of a dataset, newest first. Until version records exist (curation work
 * in server/modules/versions), an approved dataset is its own version 1; this function is the
 * one place to switch to them.
 */
export function versionsOf(dataset: Pick<IDataset, 'state' | 'approvedAt'>): LandingVersion[] {
  if (dataset.state !== 'approved' && dataset.state !== 'withdrawn') return []
  return [{ number: 1, approvedAt: dataset.approvedAt ?? null }]
}
