import { createHash } from 'node:crypto'
import { join } from 'node:path'
import type { PreviewInfo, TileQuery } from '@shared/schemas/preview.schema'
import {
  pyramidFor,
  renderOptionsKey,
  tileView,
  type RenderOptions,
  type RenderView,
  type TilePyramid,
} from '../../compute/render'
import { ConflictError, NotFoundError } from '../../errors/http-error'
import type { LocalStorage } from '../../storage/local-storage'
import { readTileIndex } from '../../compute/store'
import {
  blockSide,
  drawsPlainCounts,
  OVERVIEW_FROM_ROWS,
  type Overview,
} from '../../compute/preview'
import { LocalizationStores, type OpenedStore } from './localization-stores'
import type { PreviewTable, PreviewTables } from './preview-tables'
import type { TilePool } from './tile-pool'

interface ColumnReport {
  role: string
  min: number | null
  max: number | null
}
type TableReport = { columns?: ColumnReport[]; frames?: { first: number; last: number } | null }

/** Reference render for the brightness scale: pixels near 20 nm, at most this many a side. */
const REFERENCE_PIXEL_NM = 20
const REFERENCE_MAX_SIDE = 2048
const CONTRAST_PERCENTILE = 99.5
/** Gaussian kernels reach this many of the largest σ drawn (32 px cap of the engine). */
const GAUSSIAN_MARGIN_PX = 3 * 32
/** Tables whose overview the process keeps (each up to 64 MB), the last ones looked at. */
const OVERVIEWS_KEPT = 2

/**
 * The zoomable preview of ingested tables: what the pyramid looks like, and tiles rendered on
 * demand in the tile pool; those drawn from many localizations are kept on disk under the file's
 * derived folder by their options and the store's write time (see KEEP_FROM_LOCALIZATIONS). (On
 * the S3 profile the kept tiles stay on the node that drew them: drawn from the store, they are
 * cheaper to draw again than to fetch.)
 * Brightness is the same on every tile of a view: each level's scale derives from one reference
 * render of the whole field (per file and filter), scaled by pixel area.
 */
export class PreviewService {
  private readonly scales = new Map<string, Promise<number>>()
  /** Large tables' overviews, by file and store write time (see sharedOverview). */
  private readonly overviews = new Map<string, Promise<Overview | undefined>>()
  /** Each table's description, by store write time: tiles ask for it on every request. */
  private readonly infos = new Map<number, { mtimeMs: number; info: PreviewInfo }>()

  constructor(
    private readonly storage: LocalStorage,
    private readonly pool: TilePool,
    /** Finds a dataset's table for the preview routes without the ORM (see PreviewTables). */
    readonly tables: PreviewTables,
    /** Opens tables' stores (fetched from the bucket on the S3 profile); shared with measurements. */
    readonly stores = new LocalizationStores(storage),
  ) {}

  /** The table's description (its bounds, levels and tile size). */
  async info(file: PreviewTable): Promise<PreviewInfo> {
    return (await this.described(file)).info
  }

  /**
   * The description as the viewer asks for it, just before its first tiles: for a large table it
   * also starts the overview those coarse tiles are summed from. (Regions, measurements and the
   * report ask `info` for the bounds only and start nothing.)
   */
  async viewerInfo(file: PreviewTable): Promise<PreviewInfo> {
    const { arrowPath, mtimeMs, info } = await this.described(file)
    void this.overviewOf(file.id, arrowPath, mtimeMs, info)
    return info
  }

  /** The description by the store's write time, which tells a re-ingested table apart. */
  private async described(file: PreviewTable) {
    const { arrowPath, mtimeMs } = await this.storeOf(file)
    this.pool.warm()
    const known = this.infos.get(file.id)
    if (known?.mtimeMs === mtimeMs) return { arrowPath, mtimeMs, info: known.info }
    const info = await describe(file, arrowPath)
    this.infos.set(file.id, { mtimeMs, info })
    return { arrowPath, mtimeMs, info }
  }

  /**
   * The PNG of one tile, from the disk cache or rendered now and kept. The tile thread does both
   * (synchronous file calls are cheapest there), so the request thread only routes and checks.
   */
  async tile(file: PreviewTable, z: number, x: number, y: number, query: TileQuery) {
    const { arrowPath, mtimeMs, info } = await this.described(file)
    const pyramid = pyramidFor(info.boundsNm)
    const view = tileView(pyramid, z, x, y)
    if (!view) throw new NotFoundError('tile', `${z}/${x}/${y}`)
    const options = this.renderOptions(info, query)
    const key = createHash('sha256')
      .update(`${mtimeMs}|${renderOptionsKey(options)}|${query.brightness}`)
      .digest('hex')
      .slice(0, 24)
    const cachePath = this.storage.derivedLocation(
      file.id,
      join('tiles', key, `${z}-${x}-${y}.png`),
    )
    const high = await this.levelScale(file.id, arrowPath, mtimeMs, pyramid, view, options)
    const coarse = drawsPlainCounts(options) && blockSide(pyramid, view) !== null
    const overview = coarse ? await this.overviewOf(file.id, arrowPath, mtimeMs, info) : undefined
    const png = await this.pool.tile({
      cachePath,
      arrowPath,
      view,
      options: {
        ...options,
        contrast: { mode: 'manual', low: 0, high: high / query.brightness },
      },
      marginNm: options.method === 'gaussian' ? GAUSSIAN_MARGIN_PX * view.pixelNm : 0,
      pyramid,
      overview,
    })
    return Buffer.from(png.buffer, png.byteOffset, png.byteLength)
  }

  /**
   * The overview coarse tiles of a large table are summed from, computed by one tile thread once
   * for all of them; undefined for small tables (their tiles read the rows) or when it failed (the
   * thread then computes its own).
   */
  private overviewOf(
    fileId: number,
    arrowPath: string,
    mtimeMs: number,
    info: PreviewInfo,
  ): Promise<Overview | undefined> {
    if (info.localizations < OVERVIEW_FROM_ROWS) return Promise.resolve(undefined)
    const key = `${fileId}|${mtimeMs}`
    let overview = this.overviews.get(key)
    if (overview) {
      this.overviews.delete(key) // re-inserted below: the map's order is least recently used first
    } else {
      const pyramid = pyramidFor(info.boundsNm)
      overview = this.pool.overview({ arrowPath, pyramid }).catch(() => {
        this.overviews.delete(key)
        return undefined
      })
      if (this.overviews.size >= OVERVIEWS_KEPT)
        this.overviews.delete(this.overviews.keys().next().value!)
    }
    this.overviews.set(key, overview)
    return overview
  }

  /** The table's localization store and its write time; 409 while there is none to show. */
  private async storeOf(file: PreviewTable): Promise<OpenedStore> {
    if (file.kind !== 'localization_table')
      throw new ConflictError(`"${file.name}" is not a localization table; it has no preview.`)
    const store = await this.stores.open(file)
    if (!store)
      throw new ConflictError(`"${file.name}" has not been read yet; its preview follows.`)
    return store
  }

  private renderOptions(info: PreviewInfo, q: TileQuery): RenderOptions {
    const valueRange =
      q.colourBy === 'z'
        ? (info.zRangeNm ?? undefined)
        : q.colourBy === 'frame' && info.frames
          ? { min: info.frames.first, max: info.frames.last }
          : undefined
    return {
      method: q.method,
      colourBy: q.colourBy,
      colormap: q.colormap,
      gamma: q.gamma,
      valueRange,
      filter: {
        frameMin: q.frameMin,
        frameMax: q.frameMax,
        maxUncertaintyNm: q.maxUncertaintyNm,
        channel: q.channel,
      },
    }
  }

  /**
   * The top of the brightness scale at this view's pixel: the reference percentile scaled by
   * pixel area (counts grow with it), never below one localization for counted pixels.
   */
  private async levelScale(
    fileId: number,
    arrowPath: string,
    mtimeMs: number,
    pyramid: TilePyramid,
    view: RenderView,
    options: RenderOptions,
  ): Promise<number> {
    const reference = referenceView(pyramid)
    const key = `${fileId}|${mtimeMs}|${JSON.stringify(options.filter)}`
    let scale = this.scales.get(key)
    if (!scale) {
      scale = this.pool
        .scale({
          arrowPath,
          view: reference,
          options,
          percentile: CONTRAST_PERCENTILE,
        })
        .then((value) => value ?? 1)
      scale.catch(() => this.scales.delete(key))
      this.scales.set(key, scale)
    }
    const atLevel = (await scale) * (view.pixelNm / reference.pixelNm) ** 2
    return options.method === 'gaussian' ? atLevel : Math.max(1, atLevel)
  }
}

/** The whole field at about 20 nm per pixel (coarser for very large fields). */
function referenceView(pyramid: TilePyramid): RenderView {
  const side = Math.max(
    pyramid.boundsNm.xMax - pyramid.boundsNm.xMin,
    pyramid.boundsNm.yMax - pyramid.boundsNm.yMin,
    1,
  )
  const pixelNm = Math.max(REFERENCE_PIXEL_NM, side / REFERENCE_MAX_SIDE)
  const size = Math.max(1, Math.ceil(side / pixelNm))
  return {
    xMinNm: pyramid.boundsNm.xMin,
    yMinNm: pyramid.boundsNm.yMin,
    pixelNm,
    width: size,
    height: size,
  }
}

/** A table's preview description from its store's index and its ingest report. */
async function describe(file: PreviewTable, arrowPath: string): Promise<PreviewInfo> {
  const index = await readTileIndex(arrowPath)
  const pyramid = pyramidFor(index.boundsNm ?? { xMin: 0, xMax: 1, yMin: 0, yMax: 1 })
  const report = ((await file.report()) ?? {}) as TableReport
  const column = (role: string) => report.columns?.find((c) => c.role === role)
  const z = column('z')
  const channel = column('channel')
  return {
    tileSize: pyramid.tileSize,
    levels: pyramid.levels,
    originNm: pyramid.originNm,
    extentNm: pyramid.extentNm,
    resolutionsNm: pyramid.resolutionsNm,
    boundsNm: pyramid.boundsNm,
    localizations: index.rowCount,
    frames: report.frames ? { first: report.frames.first, last: report.frames.last } : null,
    zRangeNm: z?.min != null && z.max != null ? { min: z.min, max: z.max } : null,
    channels:
      channel?.min != null && channel.max != null
        ? Array.from({ length: channel.max - channel.min + 1 }, (_, i) => channel.min! + i)
        : null,
    hasUncertainty: index.columns.some((c) => c.role?.startsWith('uncertainty')),
  }
}
