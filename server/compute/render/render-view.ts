/**
 * The pixel grid a render fills, and the row filter every render applies.
 *
 * Orientation: image row 0 is the smallest y, so y grows downward in the image, as in a camera
 * frame. Pixel (column c, row r) covers x ∈ [xMinNm + c·pixelNm, xMinNm + (c+1)·pixelNm) and
 * y ∈ [yMinNm + r·pixelNm, …): half-open, so neighbouring views (tiles) count each point once.
 * Images are row-major: index = r·width + c.
 */
import type { Localizations, NumericColumn } from '../localizations.types'

export interface RenderView {
  /** Left edge (smallest x) of the first column, nm. */
  xMinNm: number
  /** Top edge (smallest y) of the first row, nm. */
  yMinNm: number
  /** Side of a square pixel, nm. */
  pixelNm: number
  width: number
  height: number
}

/** Which rows a render draws; every bound is optional and inclusive. */
export interface RenderFilter {
  frameMin?: number
  frameMax?: number
  /** Largest lateral uncertainty (precision) drawn, nm; rows without a finite one are dropped. */
  maxUncertaintyNm?: number
  /** Channel number drawn; tables without a channel column count as channel 0. */
  channel?: number
}

/** Whether the view describes a grid one can draw on (positive finite pixel, whole sizes). */
export function isDrawableView(view: RenderView): boolean {
  return (
    Number.isFinite(view.xMinNm) &&
    Number.isFinite(view.yMinNm) &&
    view.pixelNm > 0 &&
    Number.isFinite(view.pixelNm) &&
    Number.isInteger(view.width) &&
    Number.isInteger(view.height) &&
    view.width >= 0 &&
    view.height >= 0
  )
}

/** A blank image for the view (empty when the view cannot be drawn on). */
export function blankImage(view: RenderView): Float32Array {
  const image = new Float32Array(isDrawableView(view) ? view.width * view.height : 0)
  // Touching fresh pages in order first: faulting them in at random later cost twice as much.
  return image.fill(0)
}

/**
 * The filter compiled against one table: `accepts(i)` is small and monomorphic so it inlines
 * into the render loops. A filter on a column the table lacks drops every row (uncertainty) or
 * keeps channel 0 only (channel), so a filtered render never silently shows unfiltered data.
 */
export class RowFilter {
  readonly active: boolean
  private readonly frame: NumericColumn
  private readonly uncertainty: NumericColumn | null
  private readonly channel: NumericColumn | null
  private readonly frameMin: number
  private readonly frameMax: number
  private readonly maxUncertainty: number
  private readonly wantedChannel: number
  private readonly frameBounded: boolean
  private readonly rejectAll: boolean

  constructor(locs: Localizations, filter: RenderFilter = {}) {
    this.frame = locs.frame
    this.uncertainty = filter.maxUncertaintyNm === undefined ? null : (locs.uncertainty ?? null)
    this.channel = filter.channel === undefined ? null : (locs.channel ?? null)
    this.frameMin = filter.frameMin ?? -Infinity
    this.frameMax = filter.frameMax ?? Infinity
    this.maxUncertainty = filter.maxUncertaintyNm ?? Infinity
    this.wantedChannel = filter.channel ?? 0
    this.frameBounded = this.frameMin > -Infinity || this.frameMax < Infinity
    const noChannelColumn = filter.channel !== undefined && !locs.channel
    this.rejectAll =
      (filter.maxUncertaintyNm !== undefined && !locs.uncertainty) ||
      (noChannelColumn && filter.channel !== 0) ||
      Number.isNaN(this.frameMin) ||
      Number.isNaN(this.frameMax) ||
      Number.isNaN(this.maxUncertainty)
    this.active =
      this.rejectAll || this.frameBounded || this.uncertainty !== null || this.channel !== null
  }

  accepts(i: number): boolean {
    if (this.rejectAll) return false
    if (this.frameBounded) {
      const f = this.frame[i]!
      if (!(f >= this.frameMin && f <= this.frameMax)) return false
    }
    if (this.uncertainty !== null && !(this.uncertainty[i]! <= this.maxUncertainty)) return false
    return this.channel === null || this.channel[i] === this.wantedChannel
  }
}
