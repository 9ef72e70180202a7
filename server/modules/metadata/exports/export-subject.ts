import type { DatasetMetadata } from '@shared/metadata/metadata.schema'

/** What every export needs about the dataset besides its metadata document. */
export interface DatasetExportSubject {
  accession: string
  title: string
  description: string
  licence: string
  version: number
  landingUrl: string
  /** Depositor and project, used when no authors are given (DataCite needs a creator). */
  depositorName: string | null
  projectName: string
  submittedAt: Date | null
  approvedAt: Date | null
  embargoUntil: Date | null
  files: {
    name: string
    size: number
    sha256: string | null
    mediaType: string | null
    url: string
  }[]
  metadata: DatasetMetadata
}

/** The day the data is (or becomes) public: approval, or the end of the embargo. */
export function availableFrom(s: DatasetExportSubject): Date | null {
  if (!s.approvedAt) return null
  return s.embargoUntil && s.embargoUntil > s.approvedAt ? s.embargoUntil : s.approvedAt
}

export const spdxUrl = (id: string) => `https://spdx.org/licenses/${id}.html`
export const doiUrl = (doi: string) => `https://doi.org/${doi}`
export const day = (d: Date) => d.toISOString().slice(0, 10)
