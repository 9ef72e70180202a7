import { availableParallelism } from 'node:os'
import { computeQuality, computeQualityOnTwoThreads } from '../../compute/quality'
import { readLocalizations } from '../../compute/store'
import type { JobWork } from '../../jobs/job-protocol'
import { localColumnarStoreOf } from '../files/file-job-kinds'
import { computeQualityJob } from './quality-job-kind'

const TWO_THREADS_FROM_ROWS = 200_000

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
  const twoThreads = availableParallelism() > 1
  // A local copy: the store may have been written on another node.
  const locs = await readLocalizations(await localColumnarStoreOf(storage, payload.fileId))
  const onProgress = (fraction: number, step: string) =>
    progress(0.05 + 0.95 * fraction, STEP_WORDS[step] ?? step)
  // A second thread costs about a second to start (it loads the engines): worth it past small tables.
  return twoThreads && locs.count >= TWO_THREADS_FROM_ROWS
    ? computeQualityOnTwoThreads(locs, payload.inputs, onProgress)
    : computeQuality(locs, payload.inputs, onProgress)
}
