/**
 * Bounds on the work one measurement may ask for. Each is checked before the work starts and the
 * refusal names the bound, so a caller learns what to change (a smaller region, fewer simulations).
 */
export const REGION_LIMITS = {
  /** Localizations read for one region (all kinds): about 40 MB of coordinates. */
  maxLocalizations: 5_000_000,
  /** DBSCAN and nearest neighbours: the index and labels for this many points stay below 100 MB. */
  maxClusteringPoints: 3_000_000,
  /** DBSCAN: expected neighbours per point (density × π eps²) above which eps is no longer local. */
  maxMeanNeighbours: 2_000,
  /** Ripley: simulated points in all (points × simulations); 99 simulations of 1 M points is 10⁸. */
  maxSimulatedPoints: 200_000_000,
  maxSimulations: 999,
  /** Ripley: values of r on the curve. */
  maxRadii: 200,
  /** Line profile: bins along the line. */
  maxProfileBins: 10_000,
} as const

/** Asked-for work beyond a limit; the message states the limit. */
export class MeasurementLimitError extends Error {}
