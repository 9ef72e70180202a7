import { z } from 'zod'

/**
 * Regions of interest on a localization table. Coordinates are sample nanometres in the table's own
 * frame (x to the right, y downwards as the preview draws it), never render pixels, so a region
 * survives re-rendering and a change of the preview's zoom or binning.
 *
 * Geometry follows GeoJSON (RFC 7946) where GeoJSON has the shape, read in nm instead of degrees:
 * Polygon (rectangles and free polygons; one closed outer ring, no holes), Point, and LineString
 * with a `width` for line profiles. GeoJSON has no ellipse, so an ellipse is its own object.
 */

const nm = z.number().finite()
export const positionNmSchema = z.tuple([nm, nm])
export type PositionNm = z.infer<typeof positionNmSchema>

/** Bound on vertices: a hand-drawn outline never needs more, and the work per region stays bounded. */
export const MAX_REGION_VERTICES = 10_000

const samePosition = (a: PositionNm, b: PositionNm) => a[0] === b[0] && a[1] === b[1]

export const polygonGeometrySchema = z
  .object({
    type: z.literal('Polygon'),
    /** One linear ring: at least four positions, the last equal to the first (RFC 7946 §3.1.6). */
    coordinates: z
      .array(
        z
          .array(positionNmSchema)
          .min(4)
          .max(MAX_REGION_VERTICES + 1),
      )
      .length(1, 'A region polygon has one outer ring and no holes'),
  })
  .refine(
    (g) => {
      const ring = g.coordinates[0] ?? []
      return ring.length > 0 && samePosition(ring[0]!, ring[ring.length - 1]!)
    },
    {
      error: 'A polygon ring must end where it starts',
      path: ['coordinates'],
    },
  )

export const pointGeometrySchema = z.object({
  type: z.literal('Point'),
  coordinates: positionNmSchema,
})

export const lineGeometrySchema = z.object({
  type: z.literal('LineString'),
  coordinates: z.array(positionNmSchema).min(2).max(MAX_REGION_VERTICES),
  /** Full width of the band around the line that a profile integrates, nm. */
  width: z.number().finite().positive().max(100_000),
})

export const ellipseGeometrySchema = z.object({
  type: z.literal('Ellipse'),
  center: positionNmSchema,
  /** Semi-axes along the ellipse's own x and y before rotation, nm. */
  radii: z.tuple([z.number().finite().positive(), z.number().finite().positive()]),
  /** Rotation of the first semi-axis from the table's +x axis towards +y, degrees. */
  rotation: z.number().finite().min(-360).max(360).default(0),
})

export const regionGeometrySchema = z
  .discriminatedUnion('type', [
    polygonGeometrySchema,
    pointGeometrySchema,
    lineGeometrySchema,
    ellipseGeometrySchema,
  ])
  .meta({ id: 'RegionGeometry' })
export type RegionGeometry = z.infer<typeof regionGeometrySchema>
export type RegionGeometryInput = z.input<typeof regionGeometrySchema>

/** How the region was drawn: a rectangle and a polygon are both Polygons, but edit differently. */
export const REGION_SHAPES = ['rectangle', 'polygon', 'ellipse', 'point', 'line'] as const
export type RegionShape = (typeof REGION_SHAPES)[number]

export const regionColourSchema = z
  .string()
  .regex(/^#[0-9a-fA-F]{6}$/, 'A colour is written as #rrggbb')

export const DEFAULT_REGION_COLOUR = '#e08a3c'

/** The kind of geometry each drawing shape produces. */
export const GEOMETRY_OF_SHAPE: Record<RegionShape, RegionGeometry['type']> = {
  rectangle: 'Polygon',
  polygon: 'Polygon',
  ellipse: 'Ellipse',
  point: 'Point',
  line: 'LineString',
}

/** The shape a geometry is drawn with when the client does not say (a Polygon edits as a polygon). */
export const shapeOfGeometry = (g: Pick<RegionGeometry, 'type'>): RegionShape =>
  g.type === 'Ellipse'
    ? 'ellipse'
    : g.type === 'Point'
      ? 'point'
      : g.type === 'LineString'
        ? 'line'
        : 'polygon'

/** A shape given beside a geometry must be one that draws that kind of geometry. */
const shapeFitsGeometry = (r: { shape?: RegionShape; geometry?: { type: string } }) =>
  !r.shape || !r.geometry || GEOMETRY_OF_SHAPE[r.shape] === r.geometry.type
const SHAPE_MISMATCH = { error: 'The shape does not match the geometry', path: ['shape'] }

const regionLabelSchema = z
  .string()
  .trim()
  .min(1, 'Give the region a label')
  .max(120, 'A label can have at most 120 characters')

export const createRegionSchema = z
  .object({
    label: regionLabelSchema,
    geometry: regionGeometrySchema,
    colour: regionColourSchema.default(DEFAULT_REGION_COLOUR),
    shape: z.enum(REGION_SHAPES).optional(),
  })
  .refine(shapeFitsGeometry, SHAPE_MISMATCH)
  .meta({ id: 'CreateRegion' })
export type CreateRegionInput = z.input<typeof createRegionSchema>
export type CreateRegionBody = z.output<typeof createRegionSchema>

export const patchRegionSchema = z
  .object({
    label: regionLabelSchema.optional(),
    geometry: regionGeometrySchema.optional(),
    colour: regionColourSchema.optional(),
    shape: z.enum(REGION_SHAPES).optional(),
  })
  .refine(shapeFitsGeometry, SHAPE_MISMATCH)
  .meta({ id: 'PatchRegion' })
export type PatchRegionInput = z.input<typeof patchRegionSchema>
export type PatchRegionBody = z.output<typeof patchRegionSchema>

/** Who wrote something; null where authors are hidden (anonymous review). */
export const authorSchema = z
  .object({ id: z.number(), name: z.string() })
  .nullable()
  .meta({ id: 'Author' })
export type AuthorDto = z.infer<typeof authorSchema>

export const regionSchema = z
  .object({
    id: z.number(),
    datasetId: z.number(),
    fileId: z.number(),
    label: z.string(),
    colour: z.string(),
    shape: z.enum(REGION_SHAPES),
    geometry: regionGeometrySchema,
    author: authorSchema,
    /** Whether the one asking may edit or delete it (its author, or an owner of the dataset). */
    canChange: z.boolean(),
    createdAt: z.string(),
    updatedAt: z.string(),
  })
  .meta({ id: 'RegionOfInterest' })
export type RegionDto = z.infer<typeof regionSchema>
