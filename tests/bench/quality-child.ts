/**
 * The quality computations on one localization store in a process of their own (for the peak
 * RSS), each step timed as the reference pipeline times its own: statistics, a 10 nm render of
 * the whole field, one FRC split at 5 nm over 4096², then the whole report (every metric) as the
 * job computes it, on two threads.
 * Prints `RESULT {json}`.
 * usage: tsx tests/bench/quality-child.ts <store.arrow>
 */
import { computeFrc } from '@server/compute/frc'
import { computeQualityOnTwoThreads } from '@server/compute/quality'
import { renderHistogram } from '@server/compute/render'
import {
  countPerFrame,
  distribution,
  extent as extentOf,
  tableStatistics,
} from '@server/compute/statistics'
import type { NumericColumn } from '@server/compute/localizations.types'
import { readLocalizations } from '@server/compute/store'

const [store] = process.argv.slice(2)
if (!store) throw new Error('usage: quality-child.ts <store.arrow>')

const seconds = async <T>(work: () => T | Promise<T>): Promise<[number, T]> => {
  const started = performance.now()
  const result = await work()
  return [(performance.now() - started) / 1000, result]
}

const [readSeconds, locs] = await seconds(() => readLocalizations(store))
// The reference's own statistics step, by our engine, for a like-for-like time: the count,
// distinct frames and their range, median photons and uncertainty, the bounding box.
const [sameStatsSeconds, same] = await seconds(() => {
  const frames = countPerFrame(locs.frame, locs.count)
  const median = (column?: NumericColumn) =>
    column ? (distribution(column, locs.count).value?.median ?? null) : null
  const x = extentOf(locs.x, locs.count)
  const y = extentOf(locs.y, locs.count)
  return {
    count: locs.count,
    frames: typeof frames === 'string' ? null : frames.distinct,
    frameRange: typeof frames === 'string' ? null : [frames.first, frames.last],
    medianPhotons: median(locs.photons),
    medianUncertaintyNm: median(locs.uncertainty),
    bboxNm: x && y ? [x.min, y.min, x.max, y.max] : null,
  }
})
const [statsSeconds, stats] = await seconds(() => tableStatistics(locs))
// Again, with the engine compiled and its memory touched: what a long-running server pays.
const [statsWarmSeconds] = await seconds(() => tableStatistics(locs))
const extent = stats.summary.value!.x!
const yExtent = stats.summary.value!.y!
const view = {
  xMinNm: extent.min,
  yMinNm: yExtent.min,
  pixelNm: 10,
  width: Math.ceil((extent.max - extent.min) / 10),
  height: Math.ceil((yExtent.max - yExtent.min) / 10),
}
const [renderSeconds] = await seconds(() => renderHistogram(locs, view))
const [frcSeconds, frc] = await seconds(() => computeFrc(locs, { splits: 1 }))
const steps: Record<string, number> = {}
let last = performance.now()
let lastStep = 'start'
const [reportSeconds, report] = await seconds(() =>
  computeQualityOnTwoThreads(locs, {}, (_f, step) => {
    const now = performance.now()
    steps[lastStep] = (now - last) / 1000
    last = now
    lastStep = step
  }),
)
delete steps.start
const usage = process.resourceUsage()
process.stdout.write(
  `RESULT ${JSON.stringify({
    rows: locs.count,
    readSeconds,
    sameStatsSeconds,
    same,
    statsSeconds,
    statsWarmSeconds,
    renderSeconds,
    renderPixels: view.width * view.height,
    frcSeconds,
    frcNm: frc.resolutionUncorrectedNm,
    reportSeconds,
    reportSteps: steps,
    reportFrcNm: report.frcResolutionNm,
    peakRssMB: usage.maxRSS / 1024,
  })}\n`,
)
