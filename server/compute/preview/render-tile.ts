import {
  coloursDensity,
  columnsDrawn,
  encodeIndexedPng,
  encodePng,
  renderHistogram,
  renderImage,
  renderIndexedCounts,
  renderIndexedImage,
  percentileOfPositive,
  type BoundsNm,
  type ImageScratch,
  type RenderOptions,
  type RenderView,
  type TilePyramid,
} from '../render'
import {
  blockSide,
  countsFromOverview,
  drawsPlainCounts,
  OVERVIEW_FROM_ROWS,
  overviewOf,
  type Overview,
} from './overview'
import type { Localizations } from '../localizations.types'
import { localizationsInBox, rowsMeetingBox } from './store-rows'

const TILE_PNG_COMPRESSION = 1

export interface TileTask {
  arrowPath: string
  view: RenderView
  options: RenderOptions
  /** Localizations this far outside the view still draw into it (Gaussian kernels), nm. */
  marginNm: number
  /** The view's pyramid: coarse tiles of many rows are then summed from its overview. */
  pyramid?: TilePyramid
  /** From how many rows (in the store tiles the view meets) the overview is used. */
  overviewFromRows?: number
  /** The table's overview, computed once for every thread (see sharedOverview); else this thread's own. */
  overview?: Overview
}

/**
 * This thread's buffers for the images of its tiles (all of one size), lent to each render: fresh
 * memory costs more to touch than to clear (≈0.3–0.6 ms a tile measured, against 7 µs).
 */
let scratch: ImageScratch | null = null
function scratchFor(view: RenderView): ImageScratch {
  const pixels = view.width * view.height
  if (scratch?.density.length !== pixels)
    scratch = { density: new Float32Array(pixels), rgb: new Uint8Array(pixels * 3) }
  return scratch
}

/** A drawn tile and how many localizations it was drawn from (what it would cost to draw again). */
export interface DrawnTile {
  png: Uint8Array
  localizations: number
}

/**
 * One tile as a PNG, from the store rows in and around its view. Density colouring (the usual
 * view) goes out as a palette PNG: one byte a pixel to colour, deflate and send instead of three.
 */
export async function renderTile(task: TileTask): Promise<DrawnTile> {
  const { view, marginNm, options } = task
  const box: BoundsNm = {
    xMin: view.xMinNm - marginNm,
    xMax: view.xMinNm + view.width * view.pixelNm + marginNm,
    yMin: view.yMinNm - marginNm,
    yMax: view.yMinNm + view.height * view.pixelNm + marginNm,
  }
  const rows = () => localizationsInBox(task.arrowPath, box, columnsDrawn(options))
  // Fast deflate: a tile twice the bytes for a third of the encoding time, which on a busy
  // server decides how many tiles a second it can draw.
  if (coloursDensity(options)) {
    const drawn = (await fromOverview(task, box)) ?? fromRows(await rows(), task)
    const { indices, palette, width, height } = drawn.image
    const png = encodeIndexedPng(indices, palette, width, height, TILE_PNG_COMPRESSION)
    return { png, localizations: drawn.rows }
  }
  const locs = await rows()
  const image = renderImage(locs, view, options, scratchFor(view))
  const png = encodePng(image.rgb, image.width, image.height, TILE_PNG_COMPRESSION)
  return { png, localizations: locs.count }
}

/** The density tile binned from its rows. */
function fromRows(locs: Localizations, { view, options }: TileTask) {
  return { image: renderIndexedImage(locs, view, options, scratchFor(view)), rows: locs.count }
}

/** The tile from the overview, when it is a coarse plain-density view over many rows. */
async function fromOverview(task: TileTask, box: BoundsNm) {
  const { pyramid, view, options } = task
  if (!pyramid || !drawsPlainCounts(options)) return null
  const k = blockSide(pyramid, view)
  if (k === null) return null
  const rows = await rowsMeetingBox(task.arrowPath, box)
  if (rows < (task.overviewFromRows ?? OVERVIEW_FROM_ROWS)) return null
  const overview = task.overview ?? (await overviewOf(task.arrowPath, pyramid))
  const counts = countsFromOverview(overview, view, k)
  return { image: renderIndexedCounts(counts, view, options, scratchFor(view)), rows }
}

export interface ScaleTask {
  arrowPath: string
  view: RenderView
  options: RenderOptions
  percentile: number
}

/**
 * The brightness scale of a whole preview: the given percentile of the non-empty pixels of one
 * render of the whole field at a reference pixel size. Tiles of every level derive their own
 * scale from it, so neighbouring tiles match (a per-tile automatic contrast would show seams).
 */
export async function referenceScale(task: ScaleTask): Promise<number | null> {
  const { view } = task
  const box = {
    xMin: view.xMinNm,
    xMax: view.xMinNm + view.width * view.pixelNm,
    yMin: view.yMinNm,
    yMax: view.yMinNm + view.height * view.pixelNm,
  }
  const locs = await localizationsInBox(task.arrowPath, box, columnsDrawn(task.options))
  const counts = renderHistogram(locs, view, task.options.filter)
  return percentileOfPositive(counts, task.percentile)
}
