import { z } from 'zod'
import { PRECISION_DETECTORS } from '../../compute/statistics'
import { defineJobKind } from '../../jobs/job-kind'

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
