import {
  encodePng,
  renderHistogram,
  renderImage,
  percentileOfPositive,
  type BoundsNm,
  type RenderOptions,
  type RenderView,
} from '../render'
import { localizationsInBox } from './store-rows'

export interface TileTask {
  arrowPath: string
  view: RenderView
  options: RenderOptions
  /** Localizations this far outside the view still draw into it (Gaussian kernels), nm. */
  marginNm: number
}

/** One tile as a PNG, from the store rows in and around its view. */
export async function renderTilePng(task: TileTask): Promise<Uint8Array> {
  const { view, marginNm } = task
  const box: BoundsNm = {
    xMin: view.xMinNm - marginNm,
    xMax: view.xMinNm + view.width * view.pixelNm + marginNm,
    yMin: view.yMinNm - marginNm,
    yMax: view.yMinNm + view.height * view.pixelNm + marginNm,
  }
  const locs = await localizationsInBox(task.arrowPath, box)
  const image = renderImage(locs, view, task.options)
  return encodePng(image.rgb, image.width, image.height)
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
  const locs = await localizationsInBox(task.arrowPath, {
    xMin: view.xMinNm,
    xMax: view.xMinNm + view.width * view.pixelNm,
    yMin: view.yMinNm,
    yMax: view.yMinNm + view.height * view.pixelNm,
  })
  const counts = renderHistogram(locs, view, task.options.filter)
  return percentileOfPositive(counts, task.percentile)
}
