import type { DatasetState } from './dataset-state'

/** The path of a dataset's public landing page (rendered by the server), optionally one version. */
export const landingPath = (accession: string, version?: number) =>
  `/d/${encodeURIComponent(accession)}${version === undefined ? '' : `/v/${version}`}`

/**
 * Whether a dataset has a public landing page: approved (public or under embargo), withdrawn
 * (a tombstone), or revising after an approval (its version number has grown past 1, and the
 * approved version keeps its page).
 */
export const hasLandingPage = (d: { state: DatasetState; version: number }) =>
  d.state === 'approved' || d.state === 'withdrawn' || d.version > 1
