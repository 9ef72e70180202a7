import type { EntityManager } from '@mikro-orm/better-sqlite'
import { z } from 'zod'
import { pixelAtSample } from '@shared/domain/optics'
import { PRECISION_DETECTORS, type PrecisionDetector } from '../../compute/statistics'
import { enqueue } from '../../jobs/job-queue'
import { defineJobKind } from '../../jobs/job-kind'
import { DatasetMetadata } from '../metadata/dataset-metadata.entity'
import type { IDatasetFile } from '../files/dataset-file.entity'

/** Description values the report uses, copied into the payload when the job is queued. */
const qualityInputs = z.object({
  pixelNm: z.number().positive().optional(),
  detector: z.enum(PRECISION_DETECTORS).optional(),
  emissionNm: z.number().positive().optional(),
  numericalAperture: z.number().positive().optional(),
  psfSigmaNm: z.number().positive().optional(),
  readNoisePhotons: z.number().nonnegative().optional(),
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

/**
 * The OME detector type as the precision formulas know it: electron multiplication (EMCCD,
 * intensified and electron-bombarded CCD) selects Mortensen with F = 2; sCMOS is OME's CMOS.
 */
const DETECTOR_OF_OME: ReadonlyMap<unknown, PrecisionDetector> = new Map([
  ['EMCCD', 'emccd'],
  ['IntensifiedCCD', 'iccd'],
  ['EBCCD', 'ebccd'],
  ['CMOS', 'scmos'],
  ['CCD', 'ccd'],
])

const positive = (v: unknown) =>
  typeof v === 'number' && Number.isFinite(v) && v > 0 ? v : undefined

/** What the dataset's description says about the optics and the camera, for the report. */
export async function qualityInputsFor(
  em: EntityManager,
  datasetId: number,
): Promise<QualityJobInputs> {
  const doc = (await em.findOne(DatasetMetadata, { dataset: datasetId }))?.document
  const detector: Record<string, unknown> = doc?.instrument?.detector ?? {}
  const objective: Record<string, unknown> = doc?.instrument?.objective ?? {}
  const readNoise = detector.readNoiseE
  return {
    pixelNm: pixelAtSample({
      pixelNm: positive(detector.pixelSizeNm),
      chipPixelUm: positive(detector.physicalPixelSizeUm),
      objective: positive(objective.nominalMagnification),
      tubeLens: positive(objective.tubeLensMagnification),
    })?.pixelNm,
    detector: DETECTOR_OF_OME.get(detector.type) ?? 'unknown',
    emissionNm: positive(doc?.acquisition?.emissionWavelengthNm),
    numericalAperture: positive(objective.lensNA),
    psfSigmaNm: positive(doc?.processing?.fittedPsfSigmaNm),
    // Photoelectrons are what a table's photon counts are (DOMAIN.md §1.3), so e⁻ carry over.
    readNoisePhotons:
      typeof readNoise === 'number' && Number.isFinite(readNoise) && readNoise >= 0
        ? readNoise
        : undefined,
  }
}

/** Queues (again) the quality report of an ingested table. */
export async function queueQuality(em: EntityManager, file: IDatasetFile): Promise<void> {
  await enqueue(em, computeQualityJob, {
    fileId: file.id,
    inputs: await qualityInputsFor(em, file.dataset),
  })
}
