/**
 * Coarse tiles of large tables from an overview instead of the rows.
 *
 * A level-0 tile of a 10-million-row table reads and bins every row (≈1 s), and while it does, a
 * tile thread serves nobody. The pyramid's levels share one origin and halve their pixel each
 * step, so a pixel of level z is exactly a 2^(L−z) × 2^(L−z) block of level L's pixels: summing
 * blocks of one histogram at level L gives the histogram of any coarser level, count for count.
 * The overview is that level-L histogram of the whole field (at most 4096² pixels). The server has
 * one tile thread compute it once per table (`sharedOverview`, in memory every thread reads) and
 * hands it to each coarse tile; a tile given none computes its own, kept per store and thread. It
 * serves plain density histograms only; filters, Gaussian rendering and colour by z or time still
 * read the rows.
 */
import { stat } from 'node:fs/promises'
import type { Localizations } from '../localizations.types'
import { renderHistogram, type RenderOptions, type RenderView, type TilePyramid } from '../render'
import { readStoreColumns } from '../store/column-reader'

/** Level of the overview (or the deepest, for small pyramids): at most 256·2⁴ = 4096 pixels a side. */
const OVERVIEW_LEVEL = 4
/** Stores whose overview a thread keeps (each up to 64 MB). */
const KEPT = 2
/** From how many rows (in the store tiles a view meets) a coarse tile is summed from the overview. */
export const OVERVIEW_FROM_ROWS = 250_000

export interface Overview {
  counts: Float32Array
  view: RenderView
}

const overviews = new Map<string, { mtimeMs: number; overview: Promise<Overview> }>()

/** Whether these options draw plain counts, which an overview can stand in for. */
export function drawsPlainCounts(options: RenderOptions): boolean {
  const f = options.filter ?? {}
  return (
    (options.method ?? 'histogram') === 'histogram' &&
    (options.colourBy ?? 'density') === 'density' &&
    f.frameMin === undefined &&
    f.frameMax === undefined &&
    f.maxUncertaintyNm === undefined &&
    f.channel === undefined
  )
}

export function overviewLevel(pyramid: TilePyramid): number {
  return Math.min(pyramid.levels - 1, OVERVIEW_LEVEL)
}

/** Overview pixels per view pixel side, when the view is a coarser level of the pyramid; else null. */
export function blockSide(pyramid: TilePyramid, view: RenderView): number | null {
  const k = view.pixelNm / pyramid.resolutionsNm[overviewLevel(pyramid)]!
  return Number.isInteger(k) && k >= 2 ? k : null
}

export async function overviewOf(arrowPath: string, pyramid: TilePyramid): Promise<Overview> {
  const { mtimeMs } = await stat(arrowPath)
  const known = overviews.get(arrowPath)
  if (known?.mtimeMs === mtimeMs) return known.overview
  const overview = computeOverview(arrowPath, pyramid)
  overviews.set(arrowPath, { mtimeMs, overview })
  overview.catch(() => overviews.delete(arrowPath))
  if (overviews.size > KEPT) overviews.delete(overviews.keys().next().value!)
  return overview
}

/**
 * The overview with its counts in a SharedArrayBuffer: posted to a thread, it is shared, not
 * copied, so one computation serves every tile thread (and a thread's first coarse tile does not
 * spend most of a second computing its own).
 */
export async function sharedOverview(arrowPath: string, pyramid: TilePyramid): Promise<Overview> {
  const { counts, view } = await computeOverview(arrowPath, pyramid)
  const shared = new Float32Array(new SharedArrayBuffer(counts.byteLength))
  shared.set(counts)
  return { counts: shared, view }
}

async function computeOverview(arrowPath: string, pyramid: TilePyramid): Promise<Overview> {
  const columns = await readStoreColumns(arrowPath, (f) => ['x', 'y'].includes(f.name))
  if (!columns) throw new Error('The store cannot be read column by column.')
  const byName = new Map([...columns.columns].map(([field, values]) => [field.name, values]))
  const pixelNm = pyramid.resolutionsNm[overviewLevel(pyramid)]!
  const { originNm, boundsNm } = pyramid
  const view: RenderView = {
    xMinNm: originNm.x,
    yMinNm: originNm.y,
    pixelNm,
    width: Math.floor((boundsNm.xMax - originNm.x) / pixelNm) + 1,
    height: Math.floor((boundsNm.yMax - originNm.y) / pixelNm) + 1,
  }
  const locs = {
    count: columns.count,
    x: byName.get('x')!,
    y: byName.get('y')!,
    frame: new Uint32Array(0),
  } as Localizations
  return { counts: renderHistogram(locs, view), view }
}

/** The view's counts as sums of k × k blocks of the overview (the view is aligned to it). */
export function countsFromOverview(overview: Overview, view: RenderView, k: number): Float32Array {
  const o = overview.view
  const counts = new Float32Array(view.width * view.height)
  const column0 = Math.round((view.xMinNm - o.xMinNm) / o.pixelNm)
  const row0 = Math.round((view.yMinNm - o.yMinNm) / o.pixelNm)
  for (let r = 0; r < view.height; r++) {
    for (let dr = 0; dr < k; dr++) {
      const sourceRow = row0 + r * k + dr
      if (sourceRow < 0 || sourceRow >= o.height) continue
      const source = sourceRow * o.width
      const target = r * view.width
      for (let c = 0; c < view.width; c++) {
        const first = column0 + c * k
        if (first >= o.width || first + k <= 0) continue
        let sum = 0
        const last = Math.min(first + k, o.width)
        for (let s = Math.max(first, 0); s < last; s++) sum += overview.counts[source + s]!
        counts[target + c]! += sum
      }
    }
  }
  return counts
}
