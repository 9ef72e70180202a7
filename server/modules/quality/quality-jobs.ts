import type { EntityManager } from '@mikro-orm/better-sqlite'
import { z } from 'zod'
import { enqueue } from '../../jobs/job-queue'
import { defineJobKind } from '../../jobs/job-kind'
import { DatasetMetadata } from '../metadata/dataset-metadata.entity'
import type { IDatasetFile } from '../files/dataset-file.entity'

/** Description values the report uses, copied into the payload when the job is queued. */
const qualityInputs = z.object({
  pixelNm: z.number().positive().optional(),
  detector: z.enum(['emccd', 'scmos', 'ccd', 'unknown']).optional(),
  emissionNm: z.number().positive().optional(),
  numericalAperture: z.number().positive().optional(),
})
export type QualityJobInputs = z.output<typeof qualityInputs>

/** Every quality metric of an ingested table, computed from its localization store. */
export const computeQualityJob = defineJobKind({
  name: 'compute-quality',
  payload: z.object({ fileId: z.int().positive(), inputs: qualityInputs }),
  subject: (p) => ({ type: 'file', id: p.fileId }),
  // The store must be written (and the table's mapping settled) first.
  after: ['inspect-table', 'ingest-table'],
  freshThread: true,
})

/** The OME detector type as the precision formulas know it (EMCCD → Mortensen with F = 2). */
function detectorOf(type: string | undefined): QualityJobInputs['detector'] {
  if (type === 'EMCCD') return 'emccd'
  if (type === 'CMOS') return 'scmos'
  return type === 'CCD' ? 'ccd' : 'unknown'
}

/** What the dataset's description says about the optics, for the report. */
export async function qualityInputsFor(
  em: EntityManager,
  datasetId: number,
): Promise<QualityJobInputs> {
  const doc = (await em.findOne(DatasetMetadata, { dataset: datasetId }))?.document
  const positive = (v: unknown) => (typeof v === 'number' && v > 0 ? v : undefined)
  return {
    pixelNm: positive(doc?.instrument?.detector?.pixelSizeNm),
    detector: detectorOf(doc?.instrument?.detector?.type),
    emissionNm: positive(doc?.acquisition?.emissionWavelengthNm),
    numericalAperture: positive(doc?.instrument?.objective?.lensNA),
  }
}

/** Queues (again) the quality report of an ingested table. */
export async function queueQuality(em: EntityManager, file: IDatasetFile): Promise<void> {
  await enqueue(em, computeQualityJob, {
    fileId: file.id,
    inputs: await qualityInputsFor(em, file.dataset),
  })
}
