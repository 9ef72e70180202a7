import { computeQuality } from '../../compute/quality'
import { readLocalizations } from '../../compute/store'
import type { JobWork } from '../../jobs/job-protocol'
import { derivedPaths } from '../files/file-jobs'
import { computeQualityJob } from './quality-jobs'

const STEP_WORDS: Record<string, string> = {
  statistics: 'counting and distributions',
  merge: 'merging repeated localizations',
  nena: 'precision from neighbours (NeNA)',
  frc: 'Fourier ring correlation',
  drift: 'drift by cross-correlation',
  frcCorrected: 'FRC after drift correction',
  done: 'done',
}

/** Reads the table's store and computes every metric. Runs in a worker thread. */
export const computeQualityWork: JobWork = async (input, { storage, progress }) => {
  const payload = computeQualityJob.payload.parse(input)
  progress(0, 'reading the localizations')
  const locs = await readLocalizations(derivedPaths(storage, payload.fileId).columnar)
  return computeQuality(locs, payload.inputs, (fraction, step) =>
    progress(0.05 + 0.95 * fraction, STEP_WORDS[step] ?? step),
  )
}
