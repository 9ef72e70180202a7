/**
 * Pixels of a square grid that hold at least one localization, fused with the exact x and y
 * extents in one pass over the positions. The grid is placed from a sample of the positions with a
 * margin; only when some rows fall off it is the pass repeated on the exact extents.
 */
import type { Localizations } from '../localizations.types'
import { systematicSample } from './sampling'
import { extent, type Extent } from './summary'

interface Grid {
  x0: number
  y0: number
  width: number
  height: number
  pixelNm: number
}

export interface Occupancy {
  occupied: number
  /** Rows with finite x and y (all of them on the grid). */
  placed: number
  /** The grid pixel used: the requested one, doubled until the grid has at most 2²⁸ cells. */
  pixelNm: number
  x: Extent | null
  y: Extent | null
}

// 2²⁸ cells (a 32 MiB bit set) at most.
const MAX_CELLS = 2 ** 28
const SAMPLE_ROWS = 16_384

function gridOver(x0: number, x1: number, y0: number, y1: number, pixelNm: number): Grid {
  let pixel = pixelNm
  while (((x1 - x0) / pixel + 1) * ((y1 - y0) / pixel + 1) > MAX_CELLS) pixel *= 2
  const width = Math.floor((x1 - x0) / pixel) + 1
  const height = Math.floor((y1 - y0) / pixel) + 1
  return { x0, y0, width, height, pixelNm: pixel }
}

function bitCount(bits: Uint32Array): number {
  let count = 0
  for (let w = 0; w < bits.length; w++) {
    let v = bits[w] ?? 0
    v = v - ((v >>> 1) & 0x55555555)
    v = (v & 0x33333333) + ((v >>> 2) & 0x33333333)
    count += (Math.imul((v + (v >>> 4)) & 0x0f0f0f0f, 0x01010101) >>> 24) | 0
  }
  return count
}

/**
 * One pass: occupancy on the grid, rows off it, and the extents. Plain ternaries (branch-free in
 * V8) keep the extremes: NaN never wins a comparison; ±∞ can, and then the extents are taken
 * again with the careful `extent`. Rows failing the grid test are sorted out on that rare path.
 */
function pass(table: Localizations, grid: Grid) {
  const { x0, y0, width, height } = grid
  const bits = new Uint32Array(Math.ceil((width * height) / 32))
  const scale = 1 / grid.pixelNm
  const { x: xs, y: ys, count } = table
  let xMin = Infinity
  let xMax = -Infinity
  let yMin = Infinity
  let yMax = -Infinity
  let outside = 0
  let unplaced = 0
  // `!` rather than `?? NaN` in the hot loop: V8 then keeps raw doubles (about 2× faster).
  for (let i = 0; i < count; i++) {
    const x = xs[i]!
    const y = ys[i]!
    xMin = x < xMin ? x : xMin
    xMax = x > xMax ? x : xMax
    yMin = y < yMin ? y : yMin
    yMax = y > yMax ? y : yMax
    const px = (x - x0) * scale
    const py = (y - y0) * scale
    if (px >= 0 && py >= 0 && px < width && py < height) {
      const cell = (py | 0) * width + (px | 0)
      const word = cell >>> 5
      bits[word]! |= 1 << (cell & 31)
    } else {
      unplaced++
      if (x - x === 0 && y - y === 0) outside++
    }
  }
  const infinite = [xMin, xMax, yMin, yMax].some((v) => !Number.isFinite(v))
  const x = infinite ? extent(xs, count) : { min: xMin, max: xMax, nonFinite: 0 }
  const y = infinite ? extent(ys, count) : { min: yMin, max: yMax, nonFinite: 0 }
  if (!infinite && unplaced > outside) {
    // Some rows had a NaN coordinate: count them per axis (rare, so a second look is cheap).
    const counted = nonFiniteCounts(xs, ys, count)
    if (x) x.nonFinite = counted.x
    if (y) y.nonFinite = counted.y
  }
  return { occupied: bitCount(bits), placed: count - unplaced, outside, x, y }
}

function nonFiniteCounts(xs: Localizations['x'], ys: Localizations['y'], count: number) {
  let x = 0
  let y = 0
  for (let i = 0; i < count; i++) {
    const u = xs[i] ?? NaN
    const v = ys[i] ?? NaN
    x += u - u === 0 ? 0 : 1
    y += v - v === 0 ? 0 : 1
  }
  return { x, y }
}

function sampledGrid(table: Localizations, pixelNm: number): Grid | null {
  const xs = systematicSample(table.x, table.count, SAMPLE_ROWS)
  const ys = systematicSample(table.y, table.count, SAMPLE_ROWS)
  const [x0 = NaN, x1 = NaN] = [xs[0], xs[xs.length - 1]]
  const [y0 = NaN, y1 = NaN] = [ys[0], ys[ys.length - 1]]
  if (!(x1 >= x0 && y1 >= y0)) return null
  const margin = 0.1 * Math.max(x1 - x0, y1 - y0) + 4 * pixelNm
  return gridOver(x0 - margin, x1 + margin, y0 - margin, y1 + margin, pixelNm)
}

/** Occupied pixels and exact extents; a second pass only when the sampled grid missed rows. */
export function occupancy(table: Localizations, pixelNm: number): Occupancy {
  const first = sampledGrid(table, pixelNm)
  const firstPass = first ? pass(table, first) : null
  if (first && firstPass && firstPass.outside === 0) {
    return { ...firstPass, pixelNm: first.pixelNm }
  }
  const x = firstPass?.x ?? null
  const y = firstPass?.y ?? null
  if (!x || !y) return { occupied: 0, placed: 0, pixelNm, x, y }
  const exact = gridOver(x.min, x.max, y.min, y.max, pixelNm)
  return { ...pass(table, exact), pixelNm: exact.pixelNm }
}
