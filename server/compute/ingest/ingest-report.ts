/** The validation report of an ingest, and how chunk summaries add up to it. */
import type { ColumnRole, ColumnUnit } from '@shared/domain/localization-columns'
import type { ChunkSummary, ColumnStats } from './chunk.processor'
import type { ParsePlan } from './parse-plan'
import {
  countRejections,
  mergeRejections,
  REJECT_DESCRIPTIONS,
  REJECT_REASONS,
  type RejectExample,
  type RejectionTallies,
  type RejectReason,
} from './rejections'
import type { TableFormat } from './table-format.types'
import type { Bounds, TileGrid } from '../store/tile.grid'

export interface ColumnReport {
  name: string
  role: ColumnRole
  sourceColumn: string
  sourceIndex: number
  sourceUnit: ColumnUnit | null
  /** Unit of the stored values. */
  unit: string | null
  /** Arrow type in the output. */
  type: string
  count: number
  missing: number
  min: number | null
  max: number | null
}

export interface IngestReport {
  /** Data records read (not counting header, comments and blank lines). */
  rowsRead: number
  rowsAccepted: number
  rowsRejected: number
  blankLines: number
  rejected: Partial<
    Record<RejectReason, { count: number; description: string; examples: RejectExample[] }>
  >
  columns: ColumnReport[]
  boundsNm: Bounds | null
  /** Stored frame numbers, counted from 0. */
  frames: { first: number; last: number; sourceBase: 0 | 1 } | null
  /** Photons or background given in ADU, stored as given. */
  aduColumns: string[]
  problems: string[]
  format: Omit<TableFormat, 'dataOffset'>
  output: {
    arrowPath: string
    indexPath: string
    bytes: number
    layout: string
    grid: TileGrid
    recordBatches: number
    /** Parsed bytes that went through the spill file (0 when the table fit the memory budget). */
    spilledBytes: number
  }
  seconds: number
  /** Wall-clock seconds per phase: sniff, parse, group, write. */
  phaseSeconds: Record<string, number>
}

export interface Totals {
  rows: number
  /** Rows outside the extent of the first grid. */
  outside: number
  blankLines: number
  rejections: RejectionTallies
  stats: ColumnStats[]
}

/** Adds the chunks up in source order; example lines become 1-based lines of the file. */
export function addUp(summaries: ChunkSummary[], plan: ParsePlan, firstLine: number): Totals {
  const totals: Totals = {
    rows: 0,
    outside: 0,
    blankLines: 0,
    rejections: {},
    stats: plan.slots.map(() => emptyStats()),
  }
  let line = firstLine
  for (const summary of summaries) {
    mergeRejections(totals.rejections, summary.rejections, line)
    line += summary.lines
    totals.rows += summary.rows
    totals.outside += summary.outside
    totals.blankLines += summary.blankLines
    summary.stats.forEach((s, i) => s && mergeStats(totals.stats[i]!, s))
  }
  return totals
}

export function emptyStats(): ColumnStats {
  return { count: 0, missing: 0, min: Infinity, max: -Infinity }
}

function mergeStats(into: ColumnStats, from: ColumnStats) {
  into.count += from.count
  into.missing += from.missing
  into.min = Math.min(into.min, from.min)
  into.max = Math.max(into.max, from.max)
}

export function rejectedSection(tallies: RejectionTallies): IngestReport['rejected'] {
  const section: IngestReport['rejected'] = {}
  for (const reason of REJECT_REASONS) {
    const tally = tallies[reason]
    if (tally) section[reason] = { description: REJECT_DESCRIPTIONS[reason], ...tally }
  }
  return section
}

export function rowCounts(totals: Totals) {
  const rowsRejected = countRejections(totals.rejections)
  return {
    rowsRead: totals.rows + rowsRejected,
    rowsAccepted: totals.rows,
    rowsRejected,
    blankLines: totals.blankLines,
  }
}

export function columnReports(
  plan: ParsePlan,
  stats: ColumnStats[],
  types: string[],
): ColumnReport[] {
  return plan.slots.map((slot, i) => {
    const s = stats[i] ?? emptyStats()
    const finite = s.count > 0
    return {
      name: slot.name,
      role: slot.role,
      sourceColumn: slot.sourceName,
      sourceIndex: slot.field,
      sourceUnit: slot.sourceUnit,
      unit: slot.storedUnit,
      type: types[i] ?? slot.storage,
      count: s.count,
      missing: s.missing,
      min: finite ? s.min : null,
      max: finite ? s.max : null,
    }
  })
}

/** Bounds of one stats entry pair, or null before any row. */
export function boundsOf(x: ColumnStats | undefined, y: ColumnStats | undefined): Bounds | null {
  if (!x || !y || x.count === 0 || y.count === 0) return null
  return { xMin: x.min, xMax: x.max, yMin: y.min, yMax: y.max }
}
