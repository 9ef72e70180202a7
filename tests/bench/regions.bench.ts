/**
 * Region measurements on a region holding about a million localizations (issue: regions of
 * interest, performance): count/density, DBSCAN (eps 20 nm, minPts 5) and nearest-neighbour
 * distances each aimed under 2 s, Ripley's K/L with 99 CSR simulations under 5 s; then a comment's
 * way to 100 open event streams (comment-events.bench.ts). Each runs as the
 * API runs it: in the measurement threads, reading the region from the store. Figures only.
 */
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs'
import { loadavg, tmpdir } from 'node:os'
import { join } from 'node:path'
import type { MeasurementQuery } from '@shared/schemas/region-measurement.schema'
import { RegionMeasurer } from '@server/compute/regions'
import { simulatedStore } from '../fixtures/simulated-store'
import { benchCommentEvents } from './comment-events.bench'

const FIELD_NM = 10_000
const ms = (v: number) => `${Math.round(v)} ms`

export async function benchRegions(): Promise<Record<string, unknown>> {
  const root = mkdtempSync(join(tmpdir(), 'regions-bench-'))
  const dir = {
    dir: root,
    file: (name: string, content: string | Uint8Array) => {
      writeFileSync(join(root, name), content)
      return join(root, name)
    },
    path: (name: string) => join(root, name),
    remove: () => rmSync(root, { recursive: true, force: true }),
  }
  const measurer = new RegionMeasurer()
  const figures: Record<string, unknown> = {}
  try {
    let started = performance.now()
    // Clusters in a uniform background, ~6 localizations per emitter (bursts): about 1 M rows.
    const store = await simulatedStore(dir, 'million', {
      seed: 14,
      fieldNm: FIELD_NM,
      structure: [
        { kind: 'clusters', count: 2_000, radiusNm: 40, weight: 0.6 },
        { kind: 'uniform', weight: 0.4 },
      ],
      emitters: 170_000,
      frames: 20_000,
    })
    const prepared = performance.now() - started
    await measurer.warm()
    const region = {
      type: 'Polygon' as const,
      coordinates: [
        [
          [0, 0],
          [FIELD_NM, 0],
          [FIELD_NM, FIELD_NM],
          [0, FIELD_NM],
          [0, 0],
        ] as [number, number][],
      ],
    }
    figures['store (simulate+ingest)'] = ms(prepared)
    const queries: [string, MeasurementQuery][] = [
      ['count/density', { kind: 'summary', pointRadius: 250 }],
      ['DBSCAN 20 nm, 5', { kind: 'dbscan', pointRadius: 250, eps: 20, minPts: 5 }],
      ['nearest neighbours', { kind: 'nn', pointRadius: 250, bins: 60 }],
      [
        'Ripley 99 sims',
        {
          kind: 'ripley',
          pointRadius: 250,
          rMax: 200,
          steps: 40,
          simulations: 99,
          seed: 1,
          correction: 'translation',
        },
      ],
    ]
    for (const [name, query] of queries) {
      started = performance.now()
      const cpu = process.cpuUsage()
      const result = await measurer.measure(store, region, query)
      const took = performance.now() - started
      // CPU time of all threads: the two cores are shared with other work, so wall time alone misleads.
      const used = process.cpuUsage(cpu)
      const detail =
        result.kind === 'dbscan'
          ? `${result.clusters.length} clusters, ${result.noise} noise`
          : result.kind === 'nn'
            ? `median ${result.medianNm?.toFixed(1)} nm`
            : result.kind === 'ripley'
              ? `H(200) ${result.H[result.H.length - 1]!.toFixed(1)} nm`
              : `${result.count.toLocaleString('en')} localizations`
      figures[name] = `${ms(took)} wall, ${ms((used.user + used.system) / 1000)} CPU (${detail})`
    }
    figures['load average'] = loadavg()
      .map((v) => v.toFixed(1))
      .join(' ')
  } finally {
    await measurer.close()
    dir.remove()
  }
  return { ...figures, ...(await benchCommentEvents()) }
}
