import { z } from 'zod'

/**
 * The zoomable preview of a localization table: `GET …/files/:fileId/preview` describes the tile
 * pyramid (its geometry in sample nm), `GET …/files/:fileId/tiles/{z}/{x}/{y}.png` serves one
 * 256 × 256 tile rendered with the query's options. Tile (0, 0) of every level starts at
 * `originNm`; image row 0 is the smallest y (y grows downward, as in a camera frame).
 */

export const COLORMAPS = ['viridis', 'magma', 'inferno', 'cividis', 'grayscale'] as const
export type Colormap = (typeof COLORMAPS)[number]
export const RENDER_METHODS = ['histogram', 'gaussian'] as const
export const COLOUR_BY = ['density', 'z', 'frame', 'channels'] as const
export type ColourByChoice = (typeof COLOUR_BY)[number]

const optionalNumber = z.coerce.number().refine(Number.isFinite, 'must be a finite number')

/** Query options of a tile; every one has a default, and unknown values are refused (400). */
export const tileQuerySchema = z
  .strictObject({
    method: z.enum(RENDER_METHODS).default('histogram'),
    colourBy: z.enum(COLOUR_BY).default('density'),
    colormap: z.enum(COLORMAPS).optional(),
    /** Brightness: 1 = the dataset's own automatic scale; 2 = twice as bright, 0.5 half. */
    brightness: optionalNumber.pipe(z.number().min(0.01).max(100)).default(1),
    gamma: optionalNumber.pipe(z.number().min(0.1).max(10)).default(1),
    frameMin: optionalNumber.pipe(z.number().int().min(0)).optional(),
    frameMax: optionalNumber.pipe(z.number().int().min(0)).optional(),
    /** Only localizations at least this precise, nm. */
    maxUncertaintyNm: optionalNumber.pipe(z.number().positive()).optional(),
    /** One channel only (tables with a channel column). */
    channel: optionalNumber.pipe(z.number().int().min(0).max(65_535)).optional(),
  })
  .refine((q) => q.frameMin === undefined || q.frameMax === undefined || q.frameMin <= q.frameMax, {
    message: 'frameMin must not be after frameMax',
    path: ['frameMin'],
  })
  .meta({ id: 'TileQuery' })
export type TileQuery = z.output<typeof tileQuerySchema>
export type TileQueryInput = z.input<typeof tileQuerySchema>

export const tileParamsSchema = z.object({
  z: z.coerce.number().int().min(0).max(40),
  x: z.coerce.number().int().min(0),
  y: z.coerce.number().int().min(0),
})

export const previewInfoSchema = z
  .object({
    tileSize: z.number(),
    levels: z.number(),
    /** Corner of tile (0, 0) at every level, nm. */
    originNm: z.object({ x: z.number(), y: z.number() }),
    /** Side of the level-0 tile, nm. */
    extentNm: z.number(),
    /** Pixel size per level, nm. */
    resolutionsNm: z.array(z.number()),
    boundsNm: z.object({
      xMin: z.number(),
      xMax: z.number(),
      yMin: z.number(),
      yMax: z.number(),
    }),
    localizations: z.number(),
    frames: z.object({ first: z.number(), last: z.number() }).nullable(),
    /** Axial range, nm, for tables with z. */
    zRangeNm: z.object({ min: z.number(), max: z.number() }).nullable(),
    /** Channel numbers present, for tables with a channel column. */
    channels: z.array(z.number()).nullable(),
    hasUncertainty: z.boolean(),
  })
  .meta({ id: 'PreviewInfo' })
export type PreviewInfo = z.output<typeof previewInfoSchema>
