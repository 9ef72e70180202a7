import type { EntityManager } from '@mikro-orm/better-sqlite'
import { pixelAtSample } from '@shared/domain/optics'
import type { PrecisionDetector } from '../../compute/statistics'
import { enqueue } from '../../jobs/job-queue'
import { computeQualityJob, type QualityJobInputs } from './quality-job-kind'
import { DatasetMetadata } from '../metadata/dataset-metadata.entity'
import type { IDatasetFile } from '../files/dataset-file.entity'

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
