/**
 * One measurement of the localizations inside a region, from the points already selected (see
 * select-localizations.ts). Ripley's envelope may be computed elsewhere in parts (see
 * measure-runner.ts); everything else is one call.
 */
import type { MeasurementQuery, MeasurementResult } from '@shared/schemas/region-measurement.schema'
import type { RegionGeometry } from '@shared/schemas/region.schema'
import { checkDbscanParams, dbscan } from './dbscan'
import { lineProfile } from './line-profile'
import { MeasurementLimitError } from './limits'
import { checkNearestNeighbourParams, nearestNeighbourDistances } from './nearest-neighbours'
import { regionShape, type RegionShape } from './region-shape'
import { assembleCurves, observedCurves, ripleySetup, simulateEnvelope } from './ripley'
import { checkRipleyParams } from './ripley'
import type { RegionPoints } from './select-localizations'

/** The result without the timing and cache fields the runner adds. */
export type Measured = MeasurementResult extends infer R
  ? R extends MeasurementResult
    ? Omit<R, 'computeMs' | 'cached'>
    : never
  : never

export const DBSCAN_CONVENTION =
  'minPts counts the localization itself; neighbours are those at a distance of at most eps.'

export type RipleyQuery = Extract<MeasurementQuery, { kind: 'ripley' }>

/** The shape a query measures: a line's band may be widened by the query's width. */
export function shapeFor(geometry: RegionGeometry, query: MeasurementQuery): RegionShape {
  if (query.kind === 'profile' && geometry.type === 'LineString' && query.width)
    return regionShape({ ...geometry, width: query.width }, query.pointRadius)
  return regionShape(geometry, query.pointRadius)
}

export function measurePoints(
  points: RegionPoints,
  shape: RegionShape,
  geometry: RegionGeometry,
  query: MeasurementQuery,
): Measured {
  const { count, x, y } = points
  const base = { count, areaNm2: shape.area }
  switch (query.kind) {
    case 'summary':
      return {
        kind: 'summary',
        ...base,
        densityPerUm2: count / (shape.area / 1e6),
        meanPrecisionNm: points.precision && count > 0 ? mean(points.precision) : null,
      }
    case 'dbscan': {
      checkDbscanParams(count, shape.area, query)
      const { clusters, noise } = dbscan(x, y, count, query)
      return {
        kind: 'dbscan',
        ...base,
        eps: query.eps,
        minPts: query.minPts,
        convention: DBSCAN_CONVENTION,
        clusters,
        noise,
      }
    }
    case 'nn': {
      checkNearestNeighbourParams(count)
      return {
        kind: 'nn',
        ...base,
        ...distanceHistogram(nearestNeighbourDistances(x, y, count, shape.area), query.bins),
      }
    }
    case 'profile': {
      if (geometry.type !== 'LineString')
        throw new MeasurementLimitError('A profile is measured along a line region.')
      const width = query.width ?? geometry.width
      return {
        kind: 'profile',
        ...base,
        ...lineProfile(geometry.coordinates, width, x, y, count, query.binNm),
      }
    }
    case 'ripley': {
      checkRipleyParams(count, shape, query)
      const setup = ripleySetup(shape, query.rMax, query.steps)
      const observed = observedCurves(setup, x, y, count, query.correction)
      const parts =
        query.simulations > 0 ? [simulateEnvelope(setup, count, query, 0, query.simulations)] : []
      return { kind: 'ripley', ...base, ...assembleCurves(setup, observed, parts, query) }
    }
  }
}

function mean(values: ArrayLike<number>): number {
  let sum = 0
  for (let i = 0; i < values.length; i++) sum += values[i]!
  return sum / values.length
}

/** Histogram from 0 to the 99th percentile (the long tail goes in the last bin), mean, median. */
export function distanceHistogram(distances: Float64Array, bins: number) {
  const finite = distances.filter(Number.isFinite).sort()
  if (finite.length === 0) return { meanNm: null, medianNm: null, edges: [], counts: [] }
  const q = (p: number) => finite[Math.min(finite.length - 1, Math.floor(p * finite.length))]!
  const top = q(0.99) || finite[finite.length - 1]! || 1
  const width = top / bins
  const counts = new Array<number>(bins).fill(0)
  for (const d of finite) counts[Math.min(bins - 1, Math.floor(d / width))]!++
  return {
    meanNm: mean(finite),
    medianNm:
      finite.length % 2
        ? q(0.5)
        : (finite[finite.length / 2 - 1]! + finite[finite.length / 2]!) / 2,
    edges: Array.from({ length: bins + 1 }, (_, b) => b * width),
    counts,
  }
}
