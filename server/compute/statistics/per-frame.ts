/**
 * Localizations per frame over the run (activation and bleaching), averaged over runs of
 * consecutive frames so the curve has at most ~1000 points for plotting.
 */
import type { Localizations } from '../localizations.types'
import { countPerFrame, type FrameCounts } from './frames'
import { computed, notComputable, type StatisticResult } from './result'

export interface PerFrameCurve {
  /** Frames averaged into each point (the last point may hold fewer). */
  framesPerPoint: number
  /** First frame of each point. */
  startFrame: number[]
  /** Frames in each point. */
  frames: number[]
  /** Mean localizations per frame over each point's frames. */
  meanPerFrame: number[]
  /** Total localizations in each point. */
  total: number[]
}

export const PER_FRAME_METHOD =
  'Exact localization count of every frame from the first to the last, then the mean over ' +
  'consecutive runs of frames (frames without localizations count as 0)'

/** The curve from counts per frame (see countPerFrame). */
export function curveFromCounts(perFrame: FrameCounts, maxPoints: number): PerFrameCurve {
  const span = perFrame.counts.length
  const framesPerPoint = Math.max(1, Math.ceil(span / Math.max(1, Math.floor(maxPoints))))
  const curve: PerFrameCurve = {
    framesPerPoint,
    startFrame: [],
    frames: [],
    meanPerFrame: [],
    total: [],
  }
  for (let start = 0; start < span; start += framesPerPoint) {
    const end = Math.min(span, start + framesPerPoint)
    let total = 0
    for (let i = start; i < end; i++) total += perFrame.counts[i] ?? 0
    curve.startFrame.push(perFrame.first + start)
    curve.frames.push(end - start)
    curve.total.push(total)
    curve.meanPerFrame.push(total / (end - start))
  }
  return curve
}

/** Localizations per frame, at most `maxPoints` points (default 1000). */
export function localizationsPerFrame(
  table: Localizations,
  options: { maxPoints?: number; frameCounts?: FrameCounts | string } = {},
): StatisticResult<PerFrameCurve> {
  const maxPoints = options.maxPoints ?? 1000
  const parameters = { maxPoints }
  if (table.count === 0) {
    return notComputable('The table has no localizations.', PER_FRAME_METHOD, parameters)
  }
  const perFrame = options.frameCounts ?? countPerFrame(table.frame, table.count)
  if (typeof perFrame === 'string') return notComputable(perFrame, PER_FRAME_METHOD, parameters)
  return computed(curveFromCounts(perFrame, maxPoints), PER_FRAME_METHOD, parameters)
}
