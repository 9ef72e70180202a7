/**
 * A file's regions as GeoJSON (RFC 7946), read in nanometres of the localization table instead of
 * degrees; the convention is stated in the collection's and every feature's properties. Lines
 * carry their band width in `width`; an ellipse, which GeoJSON lacks, travels as its outline
 * polygon with the exact ellipse in `ellipse`, so a round trip through Stipple keeps it exact.
 */
import { z } from 'zod'
import { regionGeometrySchema, type RegionGeometry } from '@shared/schemas/region.schema'
import {
  COORDINATE_CONVENTION,
  ellipseOutline,
  MAX_IMPORTED_REGIONS,
  type ExchangeImport,
  type ExchangeRegion,
} from './exchange.types'

const UNITS = { units: 'nm', convention: COORDINATE_CONVENTION }

export function regionsToGeoJson(regions: ExchangeRegion[]) {
  return {
    type: 'FeatureCollection' as const,
    properties: { ...UNITS, generator: 'Stipple' },
    features: regions.map((r) => {
      const g = r.geometry
      const common = { label: r.label, ...(r.colour ? { colour: r.colour } : {}), ...UNITS }
      switch (g.type) {
        case 'Ellipse':
          return {
            type: 'Feature' as const,
            geometry: {
              type: 'Polygon' as const,
              coordinates: [ellipseOutline(g.center, g.radii, g.rotation)],
            },
            properties: {
              ...common,
              ellipse: { center: g.center, radii: g.radii, rotation: g.rotation },
            },
          }
        case 'LineString':
          return {
            type: 'Feature' as const,
            geometry: { type: 'LineString' as const, coordinates: g.coordinates },
            properties: { ...common, width: g.width },
          }
        default:
          return { type: 'Feature' as const, geometry: g, properties: common }
      }
    }),
  }
}

const featureSchema = z.object({
  type: z.literal('Feature'),
  geometry: z.object({ type: z.string(), coordinates: z.unknown() }).passthrough().nullable(),
  properties: z.record(z.string(), z.unknown()).nullable().optional(),
})
const collectionSchema = z.object({
  type: z.literal('FeatureCollection'),
  features: z.array(z.unknown()).max(MAX_IMPORTED_REGIONS),
})

const text = (v: unknown, fallback: string) =>
  typeof v === 'string' && v.trim() ? v.trim().slice(0, 200) : fallback

/** Regions from a GeoJSON FeatureCollection (or one Feature); coordinates are taken as nm. */
export function regionsFromGeoJson(input: unknown): ExchangeImport {
  const single = featureSchema.safeParse(input)
  const collection = single.success ? { features: [input] } : collectionSchema.safeParse(input).data
  if (!collection)
    throw new RangeError(
      `A GeoJSON FeatureCollection (at most ${MAX_IMPORTED_REGIONS} features) or one Feature is expected.`,
    )
  const result: ExchangeImport = {
    regions: [],
    skipped: [],
    coordinates: 'Coordinates taken as nm in the localization table’s frame (x right, y down).',
  }
  collection.features.forEach((raw, n) => {
    const item = `feature ${n + 1}`
    const feature = featureSchema.safeParse(raw)
    if (!feature.success || !feature.data.geometry) {
      result.skipped.push({ item, reason: 'not a Feature with a geometry' })
      return
    }
    const props = feature.data.properties ?? {}
    const geometry = geometryOf(feature.data.geometry, props)
    if (typeof geometry === 'string') {
      result.skipped.push({ item, reason: geometry })
      return
    }
    const colour =
      typeof props.colour === 'string' && /^#[0-9a-fA-F]{6}$/.test(props.colour)
        ? props.colour
        : undefined
    result.regions.push({
      label: text(props.label ?? props.name, `Region ${n + 1}`),
      ...(colour ? { colour } : {}),
      geometry,
    })
  })
  return result
}

/** The region geometry of a GeoJSON geometry, or why there is none. */
function geometryOf(
  g: { type: string; coordinates?: unknown },
  props: Record<string, unknown>,
): RegionGeometry | string {
  let candidate: unknown
  const ellipse = props.ellipse as Record<string, unknown> | undefined
  if (g.type === 'Polygon' && ellipse && typeof ellipse === 'object')
    candidate = { type: 'Ellipse', ...ellipse }
  else if (g.type === 'Polygon' && Array.isArray(g.coordinates) && g.coordinates.length > 1)
    return 'polygons with holes are not regions here (one outer ring only)'
  else if (g.type === 'LineString') {
    if (typeof props.width !== 'number') return 'a line needs a band width (property "width", nm)'
    candidate = { ...g, width: props.width }
  } else if (['Polygon', 'Point'].includes(g.type))
    candidate = { type: g.type, coordinates: g.coordinates }
  else return `${g.type} geometries are not regions here (Polygon, Point, LineString are)`
  const parsed = regionGeometrySchema.safeParse(candidate)
  return parsed.success
    ? parsed.data
    : `invalid ${g.type}: ${parsed.error.issues[0]?.message ?? 'bad coordinates'}`
}
