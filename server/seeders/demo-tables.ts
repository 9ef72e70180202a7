import { createHash } from 'node:crypto'
import { mkdir, writeFile } from 'node:fs/promises'
import { dirname } from 'node:path'
import type { EntityManager } from '@mikro-orm/better-sqlite'
import { simulateLocalizations, type SimulationOptions } from '../compute/simulate'
import { localizationsToCsv } from '../compute/simulate/table-text'
import { Dataset } from '../modules/datasets/dataset.entity'
import { DatasetFile } from '../modules/files/dataset-file.entity'
import { queueFirstJob } from '../modules/files/file-jobs'
import { DatasetVersion } from '../modules/versions/dataset-version.entity'
import { freezeFiles } from '../modules/versions/versions.service'
import type { LocalStorage } from '../storage/local-storage'
import { seedDemoRegions } from './demo-regions'

/** dSTORM-like blinking: a few short bursts per dye over the run. */
const DYE = { mode: 'bursts', meanBursts: 3, meanBurstFrames: 2 } as const
/** DNA-PAINT-like binding: more and longer events, brighter. */
const PAINT = { mode: 'bursts', meanBursts: 6, meanBurstFrames: 4 } as const
/** Photoactivatable proteins: about one short burst each, dimmer. */
const PROTEIN = { mode: 'bursts', meanBursts: 1.3, meanBurstFrames: 2 } as const
const STAGE_DRIFT = {
  linearNm: { x: 70, y: -45 },
  sinusoidAmplitudeNm: { x: 15, y: 10 },
  sinusoidPeriodFrames: 9000,
}

/**
 * Localization tables for the invented demo datasets, simulated in the project with fixed seeds
 * (rings, filaments, clusters; two channels; 3D; drift), so a newcomer sees real previews and
 * quality reports on first start. Invented data, for the demo only.
 */
const DEMO_TABLES: { dataset: string; file: string; simulation: SimulationOptions }[] = [
  {
    dataset: 'Nup96 dSTORM, U2OS cells, bottom nuclear envelope',
    file: 'nup96_dstorm_cell03_locs.csv',
    simulation: {
      seed: 101,
      fieldNm: 12_000,
      emitters: 36_000,
      frames: 20_000,
      structure: { kind: 'rings' },
      blinking: DYE,
      drift: STAGE_DRIFT,
    },
  },
  {
    dataset: 'Nup107 DNA-PAINT eight-fold symmetry series',
    file: 'nup107_paint_fov1_locs.csv',
    simulation: {
      seed: 102,
      fieldNm: 8000,
      emitters: 9000,
      frames: 15_000,
      structure: { kind: 'rings', siteSpreadNm: 1 },
      blinking: PAINT,
      photonsMedian: 4000,
    },
  },
  {
    dataset: 'Nuclear envelope Exchange-PAINT, two scaffold targets',
    file: 'exchange_paint_two_targets_locs.csv',
    simulation: {
      seed: 103,
      fieldNm: 8000,
      frames: 12_000,
      blinking: PAINT,
      photonsMedian: 3500,
      channels: [
        { structure: { kind: 'rings' }, emitters: 6000 },
        { structure: { kind: 'clusters', count: 120, radiusNm: 25 }, emitters: 5000 },
      ],
    },
  },
  {
    dataset: 'Pore density across the cell cycle (PALM)',
    file: 'palm_interphase_locs.csv',
    simulation: {
      seed: 104,
      fieldNm: 10_000,
      emitters: 30_000,
      frames: 10_000,
      structure: { kind: 'rings' },
      blinking: PROTEIN,
      photonsMedian: 400,
    },
  },
  {
    dataset: 'Microtubule reference sample, dSTORM without drift correction',
    file: 'tubulin_reference_uncorrected_locs.csv',
    simulation: {
      seed: 105,
      fieldNm: 10_000,
      emitters: 20_000,
      frames: 10_000,
      structure: { kind: 'filaments', count: 12 },
      blinking: DYE,
      drift: { linearNm: { x: 180, y: 120 } },
    },
  },
  {
    dataset: 'PSD-95 and RIM1 two-colour dSTORM, cultured hippocampal neurons',
    file: 'psd95_rim1_two_colour_locs.csv',
    simulation: {
      seed: 106,
      fieldNm: 10_000,
      frames: 15_000,
      blinking: DYE,
      channels: [
        { structure: { kind: 'clusters', count: 80, radiusNm: 60 }, emitters: 16_000 },
        { structure: { kind: 'clusters', count: 80, radiusNm: 40 }, emitters: 12_000 },
      ],
    },
  },
  {
    dataset: 'Bassoon 3D astigmatic STORM, cortical slices',
    file: 'bassoon_3d_locs.csv',
    simulation: {
      seed: 107,
      fieldNm: 10_000,
      emitters: 24_000,
      frames: 15_000,
      structure: { kind: 'clusters', count: 90, radiusNm: 70 },
      blinking: DYE,
      axial: { rangeNm: [-350, 350] },
    },
  },
  {
    dataset: 'Gephyrin nanodomains, DNA-PAINT',
    file: 'gephyrin_paint_locs.csv',
    simulation: {
      seed: 108,
      fieldNm: 8000,
      emitters: 8000,
      frames: 12_000,
      structure: { kind: 'clusters', count: 60, radiusNm: 35 },
      blinking: PAINT,
      photonsMedian: 4000,
    },
  },
  {
    dataset: 'Homer1 live-cell PALM pilot',
    file: 'homer1_palm_pilot_locs.csv',
    simulation: {
      seed: 109,
      fieldNm: 8000,
      emitters: 15_000,
      frames: 8000,
      structure: { kind: 'clusters', count: 70, radiusNm: 80 },
      blinking: PROTEIN,
      photonsMedian: 300,
    },
  },
]

/**
 * Deposits the demo tables as if uploaded by each dataset's creator: the bytes under their
 * storage key, the file row and its first job; the job runner then reads them and computes their
 * reports. A table already there is left alone, so running it again changes nothing.
 */
export async function seedDemoTables(
  em: EntityManager,
  storage: LocalStorage,
  onQueued: () => void = () => {},
  /** Only the tables of these datasets (by title); all when absent. */
  only?: readonly string[],
  /** The server is stopping: no further table is begun. */
  signal?: AbortSignal,
): Promise<number> {
  let created = 0
  for (const spec of DEMO_TABLES) {
    if (signal?.aborted) break
    if (only && !only.includes(spec.dataset)) continue
    // Each simulation holds the thread for about a second: let requests in between.
    await new Promise((resolve) => setImmediate(resolve))
    if (signal?.aborted) break
    const dataset = await em.findOne(Dataset, { title: spec.dataset })
    if (!dataset || (await em.count(DatasetFile, { dataset: dataset.id, name: spec.file })))
      continue
    const text = localizationsToCsv(simulateLocalizations(spec.simulation).localizations)
    const storageKey = `${dataset.id}/demo-${spec.simulation.seed}`
    const sha256 = createHash('sha256').update(text).digest('hex')
    const path = storage.originalPath(storageKey)
    await mkdir(dirname(path), { recursive: true })
    await writeFile(path, text)
    // Into the bucket on the S3 profile, where every node's jobs read it.
    await storage.mirror.publish(storage.originalKey(storageKey), { sha256 })
    await em.transactional(async (tem) => {
      const file = tem.create(DatasetFile, {
        dataset: dataset.id,
        name: spec.file,
        size: Buffer.byteLength(text),
        sha256,
        kind: 'localization_table',
        mediaType: 'text/csv',
        status: 'processing',
        storageKey,
        createdBy: dataset.createdBy ?? null,
      })
      await tem.flush()
      // Behind anything people upload, all the way to the report.
      await queueFirstJob(tem, file, { priority: -10 })
      // The demo's approved versions were frozen before their tables arrived: the table belongs
      // to version 1 as if it had been there at approval.
      const v1 = await tem.findOne(DatasetVersion, { dataset: dataset.id, number: 1 })
      if (v1) await freezeFiles(tem, storage, v1.id, [file], v1.approvedAt)
    })
    onQueued()
    created++
  }
  await seedDemoRegions(em)
  return created
}
