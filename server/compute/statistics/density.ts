/**
 * Labelling density over the occupied area and the Nyquist resolution it implies (Shroff et al.
 * 2008; DOMAIN.md §1.5 and §6): the resolution R whose Nyquist density (2/R)² equals the measured
 * density. The area is the number of grid pixels holding at least one localization times the pixel
 * area; the count is raw localizations unless merged events are given.
 */
import { nyquistDensityPerUm2 } from '@shared/domain/optics'
import type { Localizations } from '../localizations.types'
import { computed, notComputable, type StatisticResult } from './result'
import { extent, type Extent } from './summary'

export interface DensityOptions {
  /** Occupancy grid pixel, nm (default 20). */
  pixelNm?: number
  /** Number of merged events (distinct-molecule estimate) to use instead of raw localizations. */
  mergedEvents?: number
}

export interface DensitySummary {
  /** What was counted: 'raw localizations' or 'merged events'. */
  countingUnit: string
  counted: number
  pixelNm: number
  occupiedPixels: number
  occupiedAreaUm2: number
  densityPerUm2: number
  /** Resolution whose Nyquist density equals densityPerUm2, nm. */
  nyquistResolutionNm: number
  /** The same over the bounding box of all localizations, for comparison. */
  boundingBoxAreaUm2: number
  densityOverBoundingBoxPerUm2: number
  nyquistResolutionOverBoundingBoxNm: number
}

export const DENSITY_METHOD =
  'Lateral density = count ÷ occupied area (pixels of a square grid holding ≥ 1 localization); ' +
  'Nyquist resolution R from density = (2/R)² (Shroff et al. 2008). Raw localizations over-count ' +
  'molecules that blink more than once, so the density is inflated and R optimistic.'

// 2²⁸ cells (a 32 MiB bit set) at most; the pixel doubles until the grid fits.
const MAX_CELLS = 2 ** 28

/** R with nyquistDensityPerUm2(R) = density: (2/R)² scales as R⁻², so R = √(N(1)/density). */
export function nyquistResolutionNm(densityPerUm2: number): number {
  return Math.sqrt(nyquistDensityPerUm2(1) / densityPerUm2)
}

/** Occupied grid pixels, and the rows placed on the grid (those with finite x and y). */
function occupancy(table: Localizations, x: Extent, y: Extent, pixelNm: number) {
  const width = Math.floor((x.max - x.min) / pixelNm) + 1
  const height = Math.floor((y.max - y.min) / pixelNm) + 1
  const bits = new Uint32Array(Math.ceil((width * height) / 32))
  const scale = 1 / pixelNm
  const { x: xs, y: ys } = table
  let placed = 0
  for (let i = 0; i < table.count; i++) {
    const px = ((xs[i] ?? NaN) - x.min) * scale
    const py = ((ys[i] ?? NaN) - y.min) * scale
    // Non-finite positions fail this test and are skipped.
    if (px >= 0 && py >= 0 && px < width && py < height) {
      const cell = (py | 0) * width + (px | 0)
      const word = cell >>> 5
      bits[word] = (bits[word] ?? 0) | (1 << (cell & 31))
      placed++
    }
  }
  let occupied = 0
  for (let w = 0; w < bits.length; w++) {
    let v = bits[w] ?? 0
    v = v - ((v >>> 1) & 0x55555555)
    v = (v & 0x33333333) + ((v >>> 2) & 0x33333333)
    occupied += (Math.imul((v + (v >>> 4)) & 0x0f0f0f0f, 0x01010101) >>> 24) | 0
  }
  return { occupied, placed }
}

/** Density and Nyquist resolution; pass x and y extents if already computed. */
export function densityStatistics(
  table: Localizations,
  options: DensityOptions = {},
  extents?: { x: Extent | null; y: Extent | null },
): StatisticResult<DensitySummary> {
  const requested = options.pixelNm ?? 20
  const merged = options.mergedEvents
  const countingUnit = merged === undefined ? 'raw localizations' : 'merged events'
  const parameters = { pixelNm: requested, countingUnit, dimensions: 2 }
  const x = extents ? extents.x : extent(table.x, table.count)
  const y = extents ? extents.y : extent(table.y, table.count)
  if (!x || !y)
    return notComputable('No localization has a finite position.', DENSITY_METHOD, parameters)
  if (!(requested > 0) || !(merged === undefined || merged > 0)) {
    return notComputable(
      'The pixel size and the number of merged events must be above 0.',
      DENSITY_METHOD,
      parameters,
    )
  }
  let pixelNm = requested
  while (((x.max - x.min) / pixelNm + 1) * ((y.max - y.min) / pixelNm + 1) > MAX_CELLS) pixelNm *= 2
  const { occupied: pixels, placed } = occupancy(table, x, y, pixelNm)
  const counted = merged ?? placed
  const occupiedAreaUm2 = (pixels * pixelNm * pixelNm) / 1e6
  const densityPerUm2 = counted / occupiedAreaUm2
  const boundingBoxAreaUm2 = Math.max(((x.max - x.min) * (y.max - y.min)) / 1e6, occupiedAreaUm2)
  const densityOverBoundingBoxPerUm2 = counted / boundingBoxAreaUm2
  return computed(
    {
      countingUnit,
      counted,
      pixelNm,
      occupiedPixels: pixels,
      occupiedAreaUm2,
      densityPerUm2,
      nyquistResolutionNm: nyquistResolutionNm(densityPerUm2),
      boundingBoxAreaUm2,
      densityOverBoundingBoxPerUm2,
      nyquistResolutionOverBoundingBoxNm: nyquistResolutionNm(densityOverBoundingBoxPerUm2),
    },
    DENSITY_METHOD,
    { ...parameters, pixelNmUsed: pixelNm },
  )
}
