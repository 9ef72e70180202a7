/**
 * Quality report and whole-field render of the 10-million-row reference table
 * (../shared/bench/gen_locs.py), ingested once into a localization store, side by side in the same
 * run with the numpy reference (../shared/bench/reference.py) on the same table. Targets
 * (issue: quality report): statistics, the 10 nm render and one FRC split each ≤ 0.5 × the
 * reference's step; the whole report within the reference's total; peak RSS < 1.5 GB.
 */
import { execFile } from 'node:child_process'
import { existsSync } from 'node:fs'
import { join } from 'node:path'
import { fileURLToPath } from 'node:url'
import { promisify } from 'node:util'
import { suggestMapping } from '@shared/domain/localization-columns'
import { mappingFromSuggestion } from '@shared/schemas/localization-mapping.schema'
import { ingestLocalizationTable, sniffTable } from '@server/compute/ingest'
import { referenceRun, referenceTable, type ReferenceRun } from './reference-pipeline'

const run = promisify(execFile)
const repo = fileURLToPath(new URL('../..', import.meta.url))

async function storeOf(table: string): Promise<string> {
  const store = `${table}.arrow`
  if (existsSync(store)) return store
  const sniff = await sniffTable(table)
  const mapping = mappingFromSuggestion(suggestMapping(sniff.header, sniff.sampleRows))
  if (!mapping) throw new Error('no confident mapping for the reference table')
  await ingestLocalizationTable({ sourcePath: table, outputPath: store, mapping })
  return store
}

interface ChildResult {
  rows: number
  readSeconds: number
  sameStatsSeconds: number
  same: {
    count: number
    frames: number | null
    frameRange: [number, number] | null
    medianPhotons: number | null
    medianUncertaintyNm: number | null
    bboxNm: [number, number, number, number] | null
  }
  statsSeconds: number
  statsWarmSeconds: number
  renderSeconds: number
  frcSeconds: number
  frcNm: number | null
  reportSeconds: number
  reportSteps: Record<string, number>
  reportFrcNm: number | null
  peakRssMB: number
}

export async function benchQuality(): Promise<Record<string, unknown>> {
  const table = await referenceTable()
  const store = await storeOf(table)
  const args = ['--import', 'tsx', join(repo, 'tests', 'bench', 'quality-child.ts'), store]
  const { stdout } = await run(process.execPath, args, { cwd: repo, maxBuffer: 64 << 20 })
  const line = stdout.split('\n').find((l) => l.startsWith('RESULT '))
  if (!line) throw new Error(`the quality child printed no result:\n${stdout}`)
  const ours = JSON.parse(line.slice('RESULT '.length)) as ChildResult
  const reference = await referenceRun(table)
  const ref = reference.times
  const refFrc = ref.frc_total!
  const ratios = {
    stats: ours.sameStatsSeconds / ref.stats!,
    fullStats: ours.statsSeconds / ref.stats!,
    render: ours.renderSeconds / ref.render_10nm!,
    frc: ours.frcSeconds / refFrc,
    report: ours.reportSeconds / ref.total!,
  }
  return {
    rows: ours.rows,
    readStoreSeconds: r(ours.readSeconds),
    statsSeconds: `${r(ours.sameStatsSeconds)} (the reference's statistics: ${agreement(ours.same, reference.stats)})`,
    fullStatisticsSeconds: `${r(ours.statsSeconds)} cold, ${r(ours.statsWarmSeconds)} warm (every statistic of the report: 5 distributions, occupancy, per-frame curve, precision)`,
    renderSeconds: r(ours.renderSeconds),
    frcSeconds: r(ours.frcSeconds),
    reportSeconds: r(ours.reportSeconds),
    reportSteps: Object.entries(ours.reportSteps)
      .map(([k, v]) => `${k} ${r(v)}`)
      .join(', '),
    peakRssMB: Math.round(ours.peakRssMB),
    referenceSeconds: `stats ${r(ref.stats!)}, render ${r(ref.render_10nm!)}, frc ${r(refFrc)}, total ${r(ref.total!)}`,
    ratioStats: r(ratios.stats),
    ratioFullStatistics: r(ratios.fullStats),
    ratioRender: r(ratios.render),
    ratioFrc: r(ratios.frc),
    ratioReportToTotal: r(ratios.report),
    frcNm: `${r(ours.frcNm ?? NaN)} (time blocks; the reference splits per localization)`,
    targetsMet:
      ratios.stats <= 0.5 &&
      ratios.render <= 0.5 &&
      ratios.frc <= 0.5 &&
      ratios.report <= 1 &&
      ours.peakRssMB < 1500,
  }
}

const r = (v: number) => Math.round(v * 1000) / 1000

/** How our values of the reference's statistics compare with numpy's on the same table. */
function agreement(ours: ChildResult['same'], theirs: ReferenceRun['stats']): string {
  const exact =
    ours.count === theirs.count &&
    ours.frames === theirs.frames &&
    ours.frameRange?.join() === theirs.frame_range.join() &&
    ours.bboxNm?.every((v, i) => Math.abs(v - theirs.bbox_nm[i]!) < 1e-3 * Math.max(1, Math.abs(v)))
  // Our medians come from a 4096-bin histogram (error below one bin); numpy's are exact.
  const photons = Math.abs((ours.medianPhotons ?? NaN) - theirs.median_photons)
  const uncertainty = Math.abs((ours.medianUncertaintyNm ?? NaN) - theirs.median_uncertainty_nm)
  return `${exact ? 'count, frames, range and box equal numpy’s' : 'DIFFERENT from numpy'}; medians off by ${r(photons)} photons and ${r(uncertainty)} nm`
}
