import { z } from 'zod'

/**
 * A citable version of a dataset, frozen when the steward approves it: its description and its
 * file list as they were then. Label: `<accession>.v<n>`.
 */

export const DOI_STATUSES = ['pending', 'registered', 'failed'] as const
export type DoiStatus = (typeof DOI_STATUSES)[number]

export const DOI_STATUS_LABELS: Record<DoiStatus, string> = {
  pending: 'DOI registration pending',
  registered: 'DOI registered',
  failed: 'DOI registration failed',
}

export const versionFileSchema = z
  .object({
    /** Addresses the frozen file: `…/versions/:n/files/:id/content`. */
    id: z.number().int(),
    name: z.string(),
    size: z.number(),
    sha256: z.string(),
  })
  .meta({ id: 'VersionFile' })
export type VersionFileDto = z.infer<typeof versionFileSchema>

export const datasetVersionSchema = z
  .object({
    number: z.number().int().positive(),
    label: z.string(),
    accession: z.string(),
    title: z.string(),
    description: z.string(),
    licence: z.string(),
    /** The metadata document as approved. */
    metadata: z.record(z.string(), z.unknown()),
    /** Null when the files of this version are not open to the reader (embargo). */
    files: z.array(versionFileSchema).nullable(),
    fileCount: z.number(),
    totalBytes: z.number(),
    approvedAt: z.string(),
    approvedByName: z.string().nullable(),
    doi: z.string().nullable(),
    doiStatus: z.enum(DOI_STATUSES),
    /** Why the last registration attempt failed (shown to stewards). */
    doiError: z.string().nullable(),
    doiAttempts: z.number(),
  })
  .meta({ id: 'DatasetVersion' })
export type DatasetVersionDto = z.infer<typeof datasetVersionSchema>

export const datasetVersionListSchema = z
  .object({ items: z.array(datasetVersionSchema) })
  .meta({ id: 'DatasetVersionList' })

export const versionParamsSchema = z.object({
  id: z.string().min(1).max(40),
  n: z.coerce.number().int().positive(),
})
export const versionFileParamsSchema = versionParamsSchema.extend({
  fileId: z.coerce.number().int().positive(),
})

export const versionLabel = (accession: string, n: number) => `${accession}.v${n}`

/** A label read back (`STPL-000013.v1` → its accession and number); null for anything else. */
export function parseVersionLabel(label: string): { accession: string; number: number } | null {
  const parts = /^(.+)\.v(\d+)$/.exec(label)
  return parts ? { accession: parts[1]!, number: Number(parts[2]) } : null
}
