import type { Localizations } from '../localizations.types'
import type { RenderGrid } from './render-grid'

/**
 * 2D histograms (counts per bin) of the two halves on one grid, written straight into the real
 * (half A) and imaginary (half B) parts of the array that is then transformed: one complex FFT
 * serves both halves. A localization's half is that of its time block of consecutive frames.
 */
export interface TimeBlocks {
  firstFrame: number
  /** Frames covered, last − first + 1. */
  frameSpan: number
  /** Half (0 = A, 1 = B) of each block. */
  halfOfBlock: Uint8Array
}

export interface HalfCounts {
  a: number
  b: number
}

export function renderHalves(
  locs: Localizations,
  grid: RenderGrid,
  blocks: TimeBlocks,
  re: Float32Array,
  im: Float32Array,
): HalfCounts {
  const { x, y, frame } = locs
  const { size, originXNm, originYNm } = grid
  const perPixel = 1 / grid.pixelNm
  const blocksPerFrame = blocks.halfOfBlock.length / blocks.frameSpan
  const halfOfBlock = blocks.halfOfBlock
  re.fill(0)
  im.fill(0)
  let a = 0
  let b = 0
  for (let i = 0; i < locs.count; i++) {
    // Written so that NaN fails every comparison and is skipped.
    const column = (x[i]! - originXNm) * perPixel
    const row = (y[i]! - originYNm) * perPixel
    if (!(column >= 0 && column < size && row >= 0 && row < size)) continue
    const block = Math.floor((frame[i]! - blocks.firstFrame) * blocksPerFrame)
    const half = halfOfBlock[block]
    const pixel = Math.floor(row) * size + Math.floor(column)
    if (half === 0) {
      re[pixel]!++
      a++
    } else if (half === 1) {
      im[pixel]!++
      b++
    }
  }
  return { a, b }
}
