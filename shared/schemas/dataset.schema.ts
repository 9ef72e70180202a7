import { z } from 'zod'
import { DATASET_STATES } from '../domain/dataset-state'
import { curationChecklistSchema } from './curation.schema'
import { isSpdxLicenceId } from '../domain/licences'
import { SHARE_CAPABILITIES } from '../domain/roles'
import { emailSchema, idSchema, pageQuerySchema, textField } from './common.schema'

export const datasetTitleSchema = textField('Title', 200, 3)
export const datasetDescriptionSchema = z
  .string()
  .trim()
  .max(10_000, 'Description can have at most 10000 characters')
export const licenceSchema = z
  .string()
  .trim()
  .refine(isSpdxLicenceId, { error: 'Not a known SPDX licence identifier (for example CC-BY-4.0)' })

/** A calendar date, `YYYY-MM-DD`. An embargo ends at 00:00 UTC of that day. */
export const isoDateSchema = z
  .string()
  .regex(/^\d{4}-\d{2}-\d{2}$/, 'Use a date such as 2027-06-30')
  .refine((s) => {
    const t = Date.parse(`${s}T00:00:00Z`)
    return !Number.isNaN(t) && new Date(t).toISOString().startsWith(s)
  }, 'Not a real calendar date')

export const createDatasetSchema = z
  .object({
    projectId: z.number({ error: 'Choose a project' }).int().positive('Choose a project'),
    title: datasetTitleSchema,
    description: datasetDescriptionSchema.default(''),
    licence: licenceSchema.optional(),
  })
  .meta({ id: 'CreateDataset' })
export type CreateDatasetInput = z.input<typeof createDatasetSchema>
export type CreateDatasetBody = z.output<typeof createDatasetSchema>

export const updateDatasetSchema = z
  .object({
    title: datasetTitleSchema,
    description: datasetDescriptionSchema,
    licence: licenceSchema,
    proposedEmbargoUntil: isoDateSchema.nullable(),
  })
  .partial()
  .strict()
  .meta({ id: 'UpdateDataset' })
export type UpdateDatasetInput = z.input<typeof updateDatasetSchema>
export type UpdateDatasetBody = z.output<typeof updateDatasetSchema>

export const DATASET_SORT_FIELDS = [
  'createdAt',
  'updatedAt',
  'title',
  'accession',
  'state',
] as const
export type DatasetSortField = (typeof DATASET_SORT_FIELDS)[number]
const sortValues = DATASET_SORT_FIELDS.flatMap((f) => [f, `-${f}`] as const)

export const listDatasetsQuerySchema = pageQuerySchema
  .extend({
    sort: z
      .enum(sortValues as [string, ...string[]], {
        error: `sort must be one of ${sortValues.join(', ')}`,
      })
      .default('-createdAt'),
    /** Words to find in title, description or accession (each word, its end as a prefix). */
    q: z.string().trim().max(200, 'A search can have at most 200 characters').optional(),
    projectId: idSchema.optional(),
    state: z.enum(DATASET_STATES).optional(),
    /** The previous page's `nextCursor`: the next page at any depth, without an offset. */
    cursor: z.string().max(500, 'Not a cursor this list gave out').optional(),
  })
  .refine((q) => !(q.cursor && q.offset > 0), {
    error: 'Give either an offset or a cursor, not both',
    path: ['cursor'],
  })
export type ListDatasetsQuery = z.input<typeof listDatasetsQuerySchema>
export type ListDatasetsParams = z.output<typeof listDatasetsQuerySchema>

export const shareDatasetSchema = z
  .object({
    email: emailSchema,
    capabilities: z
      .array(z.enum(SHARE_CAPABILITIES))
      .max(SHARE_CAPABILITIES.length)
      .default([])
      .transform((c) => [...new Set(c)]),
    message: z.string().trim().max(2000).optional(),
  })
  .meta({ id: 'ShareDataset' })
export type ShareDatasetInput = z.input<typeof shareDatasetSchema>
export type ShareDatasetBody = z.output<typeof shareDatasetSchema>

export const REVIEW_DECISIONS = ['approve', 'request_changes', 'withdraw'] as const
export type ReviewDecision = (typeof REVIEW_DECISIONS)[number]

export const reviewDatasetSchema = z
  .object({
    decision: z.enum(REVIEW_DECISIONS),
    comment: z.string().trim().max(4000).default(''),
    embargoUntil: isoDateSchema.nullable().optional(),
    /** The steward's ticks on the curation checklist (see curation.schema.ts). */
    checklist: curationChecklistSchema.optional(),
  })
  .refine((r) => r.decision === 'approve' || r.comment.length > 0, {
    error: 'Say what must change, or why the dataset is withdrawn',
    path: ['comment'],
  })
  .meta({ id: 'ReviewDataset' })
export type ReviewDatasetInput = z.input<typeof reviewDatasetSchema>
export type ReviewDatasetBody = z.output<typeof reviewDatasetSchema>

export const setEmbargoSchema = z
  .object({
    until: isoDateSchema.nullable(),
    reason: textField('Reason', 2000),
  })
  .meta({ id: 'SetEmbargo' })
export type SetEmbargoInput = z.input<typeof setEmbargoSchema>
export type SetEmbargoBody = z.output<typeof setEmbargoSchema>

export const datasetShareSchema = z
  .object({
    id: z.number(),
    userId: z.number(),
    email: z.string(),
    /** Empty while the invitation is open: nobody has signed in with that address yet. */
    name: z.string(),
    /** Invited by e-mail, not signed in yet: the share waits for them. */
    invitationOpen: z.boolean(),
    capabilities: z.array(z.enum(SHARE_CAPABILITIES)),
    createdAt: z.string(),
  })
  .meta({ id: 'DatasetShare' })
export type DatasetShareDto = z.infer<typeof datasetShareSchema>

/** The steward's last word on a dataset sent back or withdrawn: what must change, or why it went. */
export const stewardNoteSchema = z
  .object({
    decision: z.enum(['request_changes', 'withdraw']),
    comment: z.string(),
    at: z.string(),
  })
  .meta({ id: 'StewardNote' })
export type StewardNoteDto = z.infer<typeof stewardNoteSchema>

export const datasetSchema = z
  .object({
    id: z.number(),
    accession: z.string(),
    title: z.string(),
    description: z.string(),
    project: z.object({ id: z.number(), name: z.string() }),
    state: z.enum(DATASET_STATES),
    embargoUntil: z.string().nullable(),
    proposedEmbargoUntil: z.string().nullable(),
    licence: z.string(),
    version: z.number(),
    createdBy: z.object({ id: z.number(), name: z.string() }).nullable(),
    createdAt: z.string(),
    updatedAt: z.string(),
    submittedAt: z.string().nullable(),
    approvedAt: z.string().nullable(),
    /** Only on a single dataset's answer, while it is sent back for changes or withdrawn. */
    stewardNote: stewardNoteSchema.nullable().optional(),
  })
  .meta({ id: 'Dataset' })
export type DatasetDto = z.infer<typeof datasetSchema>

/**
 * A dataset as the list shows it: everything but its description (free text of any length, read
 * on the dataset's own page), so a page of fifty stays small whatever the descriptions hold.
 */
export const datasetSummarySchema = datasetSchema
  .omit({ description: true, stewardNote: true })
  .meta({ id: 'DatasetSummary' })
export type DatasetSummaryDto = z.infer<typeof datasetSummarySchema>

/** One page of the dataset list. */
export const datasetPageSchema = z
  .object({
    items: z.array(datasetSummarySchema),
    /** Every dataset the filters select for this viewer, not only this page. */
    total: z.number().int(),
    /** Pass as `cursor` for the page after this one; null on the last page. */
    nextCursor: z.string().nullable(),
  })
  .meta({ id: 'DatasetPage' })
export type DatasetPage = z.infer<typeof datasetPageSchema>
