/**
 * Measurements run off the request thread, in a small pool of threads (at most one per core, two
 * here). Ripley's envelope is split: one thread reads the region and computes the observed curves,
 * then the simulations are shared out between the threads (simulation s always uses seed + s, so
 * the split never changes the envelope).
 */
import { availableParallelism } from 'node:os'
import { Piscina } from 'piscina'
import type { MeasurementQuery } from '@shared/schemas/region-measurement.schema'
import type { RegionGeometry } from '@shared/schemas/region.schema'
import { poolEntry } from '../../threads'
import type { Measured, RipleyQuery } from './measure'
import type { RegionTask, RegionTaskAnswer } from './region.worker'

/** A measurement refused for its input: over a limit, or a shape that cannot be measured. */
export class MeasurementRefusedError extends Error {
  constructor(
    readonly reason: 'limit' | 'shape',
    message: string,
  ) {
    super(message)
  }
}

interface ObservedRipley {
  count: number
  areaNm2: number
  pixelNm: number
  r: number[]
  observed: { K: number[]; L: number[]; H: number[] }
}

export class RegionMeasurer {
  private readonly threads = Math.max(1, Math.min(2, availableParallelism()))
  private readonly pool = new Piscina({
    ...poolEntry(new URL('./region.worker.ts', import.meta.url)),
    minThreads: 0,
    maxThreads: this.threads,
    idleTimeout: 60_000,
  })

  /** Starts the threads ahead of a first measurement (each loads the engines, ~1 s under tsx). */
  async warm() {
    await Promise.all(Array.from({ length: this.threads }, () => this.run({ op: 'warm' })))
  }

  async measure(
    storePath: string,
    geometry: RegionGeometry,
    query: MeasurementQuery,
  ): Promise<Measured> {
    if (query.kind !== 'ripley' || query.simulations === 0)
      return (await this.run({ op: 'measure', storePath, geometry, query })) as Measured
    return this.ripley(storePath, geometry, query)
  }

  close(): Promise<void> {
    return this.pool.destroy()
  }

  private async ripley(
    storePath: string,
    geometry: RegionGeometry,
    query: RipleyQuery,
  ): Promise<Measured> {
    const seen = (await this.run({
      op: 'ripley-observed',
      storePath,
      geometry,
      query,
    })) as ObservedRipley
    const share = Math.ceil(query.simulations / this.threads)
    const parts = (await Promise.all(
      Array.from({ length: this.threads }, (_, t) => {
        const from = t * share
        const to = Math.min(query.simulations, from + share)
        return from < to
          ? this.run({ op: 'ripley-envelope', geometry, query, count: seen.count, from, to })
          : null
      }).filter((p) => p !== null),
    )) as { low: Float64Array; high: Float64Array }[]
    const pointwise = (
      pick: (p: (typeof parts)[number], j: number) => number,
      f: (...v: number[]) => number,
    ) => seen.r.map((_, j) => f(...parts.map((p) => pick(p, j))))
    return {
      kind: 'ripley',
      count: seen.count,
      areaNm2: seen.areaNm2,
      r: seen.r,
      ...seen.observed,
      envelope: {
        low: pointwise((p, j) => p.low[j]!, Math.min),
        high: pointwise((p, j) => p.high[j]!, Math.max),
      },
      simulations: query.simulations,
      correction: query.correction,
      pixelNm: seen.pixelNm,
    }
  }

  private async run(task: RegionTask): Promise<unknown> {
    const answer = (await this.pool.run(task)) as RegionTaskAnswer
    if (!answer.ok) throw new MeasurementRefusedError(answer.reason, answer.message)
    return answer.value
  }
}
