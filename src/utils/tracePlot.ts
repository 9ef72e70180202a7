/** Scales, ticks and the line of a small line chart (the per-frame mean trace of a raw stack). */

export type Scale = (value: number) => number

/** Maps [d0, d1] linearly onto [r0, r1]; a domain of one value maps to the range's middle. */
export function linearScale([d0, d1]: [number, number], [r0, r1]: [number, number]): Scale {
  const span = d1 - d0
  if (span === 0) return () => (r0 + r1) / 2
  return (value) => r0 + ((value - d0) / span) * (r1 - r0)
}

/** A "nice" number near x: 1, 2 or 5 (rounded) or 1, 2, 5, 10 (ceiling) times a power of ten. */
export function niceNumber(x: number, round: boolean): number {
  const exponent = Math.floor(Math.log10(x))
  const fraction = x / 10 ** exponent
  let nice: number
  if (round) nice = fraction < 1.5 ? 1 : fraction < 3 ? 2 : fraction < 7 ? 5 : 10
  else nice = fraction <= 1 ? 1 : fraction <= 2 ? 2 : fraction <= 5 ? 5 : 10
  return nice * 10 ** exponent
}

export interface Ticks {
  /** The axis' ends, widened to whole steps around the data. */
  domain: [number, number]
  values: number[]
  /** Decimals the labels need at this step. */
  decimals: number
}

/**
 * About `count` tick values over [min, max] at a step of 1, 2 or 5 × 10ⁿ, the axis widened to
 * the ticks around the data: Heckbert's "loose labeling" (Nice numbers for graph labels,
 * Graphics Gems, 1990).
 */
export function niceTicks(min: number, max: number, count = 5): Ticks {
  if (!(max > min)) {
    const pad = Math.abs(min) > 0 ? Math.abs(min) * 0.1 : 1
    return niceTicks(min - pad, max + pad, count)
  }
  const range = niceNumber(max - min, false)
  const step = niceNumber(range / (count - 1), true)
  const low = Math.floor(min / step) * step
  const high = Math.ceil(max / step) * step
  const values: number[] = []
  // Whole steps counted, not added up, so the last tick is not lost to rounding.
  for (let i = 0; low + i * step <= high + step / 2; i++) values.push(low + i * step)
  const decimals = Math.max(-Math.floor(Math.log10(step)), 0)
  return { domain: [low, high], values: values.map((v) => round(v, decimals)), decimals }
}

const round = (v: number, decimals: number) => Number(v.toFixed(decimals))

export interface TracePoint {
  frame: number
  value: number
}

/**
 * At most `buckets` × 2 points of a long trace: the lowest and highest value of each run of
 * frames, in frame order, so a chart a few hundred pixels wide still shows every spike and dip.
 */
export function decimate(values: readonly number[], buckets: number): TracePoint[] {
  if (values.length <= buckets * 2) return values.map((value, frame) => ({ frame, value }))
  const points: TracePoint[] = []
  const per = values.length / buckets
  for (let b = 0; b < buckets; b++) {
    const start = Math.floor(b * per)
    const end = Math.floor((b + 1) * per)
    let lo = start
    let hi = start
    for (let i = start; i < end; i++) {
      if (values[i]! < values[lo]!) lo = i
      if (values[i]! > values[hi]!) hi = i
    }
    for (const frame of lo === hi ? [lo] : [Math.min(lo, hi), Math.max(lo, hi)]) {
      points.push({ frame, value: values[frame]! })
    }
  }
  return points
}

/** An SVG path through the points. */
export function linePath(points: readonly TracePoint[], x: Scale, y: Scale): string {
  return points
    .map((p, i) => `${i === 0 ? 'M' : 'L'}${x(p.frame).toFixed(1)},${y(p.value).toFixed(1)}`)
    .join(' ')
}
