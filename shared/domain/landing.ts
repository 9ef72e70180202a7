import type { DatasetState } from './dataset-state'

/** The path of a dataset's public landing page (rendered by the server), optionally one version. */
export const landingPath = (accession: string, version?: number) =>
  `/d/${encodeURIComponent(accession)}${version === undefined ? '' : `/v/${version}`}`

/** States that have a public landing page: approved (public or under embargo) and withdrawn. */
export const hasLandingPage = (state: DatasetState) => state === 'approved' || state === 'withdrawn'
