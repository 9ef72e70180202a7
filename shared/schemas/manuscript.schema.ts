import { z } from 'zod'
import { DATASET_STATES } from '../domain/dataset-state'
import { textField } from './common.schema'

export const journalSchema = z.object({ id: z.number(), name: z.string() }).meta({ id: 'Journal' })
export type JournalDto = z.infer<typeof journalSchema>

export const createManuscriptSchema = z
  .object({
    journalId: z.number().int().positive({ error: 'Choose a journal' }),
    reference: textField('Manuscript number', 80),
    title: textField('Manuscript title', 300),
    /** Accessions or numeric ids of datasets to attach at once (each needs the share right). */
    datasets: z
      .array(z.union([z.string().min(1).max(40), z.number().int().positive()]))
      .max(50)
      .default([]),
  })
  .meta({ id: 'CreateManuscript' })
export type CreateManuscriptInput = z.infer<typeof createManuscriptSchema>

export const attachDatasetSchema = z
  .object({ dataset: z.union([z.string().min(1).max(40), z.number().int().positive()]) })
  .meta({ id: 'AttachDataset' })
export type AttachDatasetInput = z.infer<typeof attachDatasetSchema>

/** One dataset of a manuscript as its journal's editors see it. */
export const manuscriptDatasetSchema = z.object({
  id: z.number(),
  accession: z.string(),
  title: z.string(),
  state: z.enum(DATASET_STATES),
  embargoUntil: z.string().nullable(),
  liveReviewerLinks: z.number(),
})
export type ManuscriptDatasetDto = z.infer<typeof manuscriptDatasetSchema>

export const manuscriptSchema = z
  .object({
    id: z.number(),
    journal: journalSchema,
    reference: z.string(),
    title: z.string(),
    createdAt: z.string(),
    createdBy: z.object({ id: z.number(), name: z.string() }).nullable(),
    /** Only the datasets the caller may read; `hiddenDatasets` counts the others. */
    datasets: z.array(manuscriptDatasetSchema),
    hiddenDatasets: z.number(),
  })
  .meta({ id: 'Manuscript' })
export type ManuscriptDto = z.infer<typeof manuscriptSchema>
