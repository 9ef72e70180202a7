/**
 * Regions of interest: containment for every region shape, the localizations inside a region
 * read from the store, and measurements of them (summary, DBSCAN, Ripley's K/L/H with a CSR
 * envelope, nearest-neighbour distances, line profiles), run in threads by RegionMeasurer.
 */
export { regionShape, RegionShapeError, selfIntersection, type RegionShape } from './region-shape'
export { selectLocalizations, type RegionPoints } from './select-localizations'
export { REGION_LIMITS, MeasurementLimitError } from './limits'
export { dbscan, type DbscanResult, type DbscanCluster } from './dbscan'
export { nearestNeighbourDistances } from './nearest-neighbours'
export { ripley, type RipleyCurves, type RipleyParams } from './ripley'
export { lineProfile, FWHM_PER_SIGMA, type LineProfile } from './line-profile'
export { measurePoints, shapeFor, DBSCAN_CONVENTION, type Measured } from './measure'
export { RegionMeasurer, MeasurementRefusedError } from './measure-runner'
