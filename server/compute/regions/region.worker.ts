/**
 * A measurement thread's one entry (Piscina calls the default export with each task). Expected
 * refusals (limits, unmeasurable shapes) come back as values: an error's class does not survive
 * the trip between threads, and the caller answers them differently from faults.
 */
import type { MeasurementQuery } from '@shared/schemas/region-measurement.schema'
import type { RegionGeometry } from '@shared/schemas/region.schema'
import { MeasurementLimitError } from './limits'
import { measurePoints, shapeFor, type Measured, type RipleyQuery } from './measure'
import { RegionShapeError } from './region-shape'
import { checkRipleyParams, observedCurves, ripleySetup, simulateEnvelope } from './ripley'
import { selectLocalizations } from './select-localizations'

export type RegionTask =
  | { op: 'warm' }
  | { op: 'measure'; storePath: string; geometry: RegionGeometry; query: MeasurementQuery }
  /** Ripley without simulations, and the point count the simulations need. */
  | { op: 'ripley-observed'; storePath: string; geometry: RegionGeometry; query: RipleyQuery }
  | {
      op: 'ripley-envelope'
      geometry: RegionGeometry
      query: RipleyQuery
      count: number
      from: number
      to: number
    }

export type RegionTaskAnswer =
  { ok: true; value: unknown } | { ok: false; reason: 'limit' | 'shape'; message: string }

export default async function run(task: RegionTask): Promise<RegionTaskAnswer> {
  try {
    return { ok: true, value: await perform(task) }
  } catch (err) {
    if (err instanceof MeasurementLimitError)
      return { ok: false, reason: 'limit', message: err.message }
    if (err instanceof RegionShapeError) return { ok: false, reason: 'shape', message: err.message }
    throw err
  }
}

async function perform(task: RegionTask): Promise<unknown> {
  switch (task.op) {
    case 'warm':
      return null
    case 'measure': {
      const shape = shapeFor(task.geometry, task.query)
      const points = await selectLocalizations(task.storePath, shape)
      return measurePoints(points, shape, task.geometry, task.query) satisfies Measured
    }
    case 'ripley-observed': {
      const shape = shapeFor(task.geometry, task.query)
      const points = await selectLocalizations(task.storePath, shape)
      checkRipleyParams(points.count, shape, task.query)
      const setup = ripleySetup(shape, task.query.rMax, task.query.steps)
      const observed = observedCurves(
        setup,
        points.x,
        points.y,
        points.count,
        task.query.correction,
      )
      return {
        count: points.count,
        areaNm2: shape.area,
        pixelNm: setup.grid.pixelNm,
        r: setup.radii,
        observed,
      }
    }
    case 'ripley-envelope': {
      const shape = shapeFor(task.geometry, task.query)
      const setup = ripleySetup(shape, task.query.rMax, task.query.steps)
      return simulateEnvelope(setup, task.count, task.query, task.from, task.to)
    }
  }
}
