/** The ingest report from what the phases found. */
import {
  columnReports,
  rejectedSection,
  rowCounts,
  type IngestReport,
  type Totals,
} from './ingest-report'
import type { ParsePlan } from './parse-plan'
import type { TableSniff } from './table-format.types'
import type { Bounds, TileGrid } from '../store/tile.grid'
import { indexPathFor } from '../store/tile.index'

export interface Outcome {
  sniff: TableSniff
  plan: ParsePlan
  totals: Totals
  bounds: Bounds | null
  grid: TileGrid
  types: string[]
  bytes: number
  batches: number
  spilledBytes: number
}

export function buildReport(
  outputPath: string,
  o: Outcome,
  phases: Record<string, number>,
): IngestReport {
  const { dataOffset: _o, sampleRows: _r, averageRowBytes: _b, problems: _p, ...format } = o.sniff
  const frameSlot = o.plan.slots.findIndex((s) => s.role === 'frame')
  const frame = o.totals.stats[frameSlot]
  const sourceBase = o.plan.slots[frameSlot]?.offset === 0 ? 0 : 1
  return {
    ...rowCounts(o.totals),
    rejected: rejectedSection(o.totals.rejections),
    columns: columnReports(o.plan, o.totals.stats, o.types),
    boundsNm: o.bounds,
    frames: frame && frame.count > 0 ? { first: frame.min, last: frame.max, sourceBase } : null,
    aduColumns: o.plan.slots.filter((s) => s.sourceUnit === 'adu').map((s) => s.sourceName),
    problems: problemsOf(o),
    format,
    output: {
      arrowPath: outputPath,
      indexPath: indexPathFor(outputPath),
      bytes: o.bytes,
      layout:
        'one record batch per non-empty tile of a square x/y grid, tiles row-major (tile.index.ts)',
      grid: o.grid,
      recordBatches: o.batches,
      spilledBytes: o.spilledBytes,
    },
    seconds: Object.values(phases).reduce((a, b) => a + b, 0),
    phaseSeconds: phases,
  }
}

function problemsOf(o: Outcome): string[] {
  const problems = [...o.sniff.problems]
  const widest = Math.max(...o.plan.slots.map((s) => s.field + 1))
  if (widest > o.sniff.columnCount) {
    problems.push(
      `The mapping uses column ${widest}, but the lines have ${o.sniff.columnCount} field(s)`,
    )
  }
  for (const slot of o.plan.slots.filter((s) => s.sourceUnit === 'adu')) {
    problems.push(
      `"${slot.sourceName}" is in ADU and is stored as given: converting to photons needs the ` +
        'camera offset and conversion factor (e⁻/ADU)',
    )
  }
  for (const slot of o.plan.slots.filter((s) => s.mappedRole === 'fwhm')) {
    problems.push(
      `"${slot.sourceName}" is a FWHM and is stored as the PSF's standard deviation (FWHM ÷ 2.3548)`,
    )
  }
  const frameZero = o.totals.rejections.negative_frame?.count ?? 0
  if (frameZero > 0 && o.plan.slots.some((s) => s.role === 'frame' && s.offset === 1)) {
    problems.push(`${frameZero} row(s) have frame 0 while frames are declared to count from 1`)
  }
  if (o.totals.rows === 0) problems.push('No row was accepted')
  return problems
}
