/** The states of a dataset's life (PRODUCT.md, "A dataset's life"). */
export const DATASET_STATES = [
  'draft',
  'submitted',
  'changes_requested',
  'approved',
  'withdrawn',
] as const
export type DatasetState = (typeof DATASET_STATES)[number]

export const DATASET_STATE_LABELS: Record<DatasetState, string> = {
  draft: 'Draft',
  submitted: 'Submitted',
  changes_requested: 'Changes requested',
  approved: 'Approved',
  withdrawn: 'Withdrawn',
}

/**
 * What access depends on: the state, and for approved datasets whether the embargo has ended.
 * "released" is an approved dataset that is public (no embargo, or the embargo date has passed).
 */
export const ACCESS_PHASES = [
  'draft',
  'submitted',
  'changes_requested',
  'embargoed',
  'released',
  'withdrawn',
] as const
export type AccessPhase = (typeof ACCESS_PHASES)[number]

export const ACCESS_PHASE_LABELS: Record<AccessPhase, string> = {
  draft: 'Draft',
  submitted: 'Submitted',
  changes_requested: 'Changes requested',
  embargoed: 'Approved, under embargo',
  released: 'Approved, public',
  withdrawn: 'Withdrawn',
}

export interface DatasetAccessFacts {
  state: DatasetState
  embargoUntil?: Date | null
}

export function accessPhase(dataset: DatasetAccessFacts, now: Date = new Date()): AccessPhase {
  if (dataset.state !== 'approved') return dataset.state
  return dataset.embargoUntil && dataset.embargoUntil.getTime() > now.getTime()
    ? 'embargoed'
    : 'released'
}

/** Accessions: our own prefix and a zero-padded sequence number; never reused. */
export const ACCESSION_PREFIX = 'STPL-'
export const ACCESSION_PATTERN = /^STPL-\d{6,}$/

export function formatAccession(sequence: number): string {
  return `${ACCESSION_PREFIX}${String(sequence).padStart(6, '0')}`
}
