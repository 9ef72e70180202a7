/** The quality report of a localization table: every metric, one entry (two with threads). */
export { computeQuality, type QualityInputs } from './compute-quality'
export { computeQualityOnTwoThreads } from './two-thread-quality'
