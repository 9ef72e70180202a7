/** The quality report of a localization table: every metric, one entry. */
export { computeQuality, type QualityInputs } from './compute-quality'
