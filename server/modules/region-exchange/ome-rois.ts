/**
 * A file's regions as OME-XML ROIs (schema 2016-06). OME shapes are drawn on an image's pixels,
 * so the export carries one metadata-only Image whose pixel is 1 nm (PhysicalSize 1 nm): its pixel
 * frame is the localization table's nm frame, and every ROI hangs from it. Rectangles stay
 * Rectangles, ellipses are Ellipses with a rotation Transform, lines are Line/Polyline with the
 * band width as StrokeWidth in nm. The import reads the same shapes back, scaled by the
 * referencing image's physical pixel size when it has one.
 */
import type { RegionGeometry } from '@shared/schemas/region.schema'
import { regionGeometrySchema } from '@shared/schemas/region.schema'
import { parseOmeXml, type XmlNode } from '../metadata/ome/ome-parse'
import { OME_DEFAULT_UNITS, toStippleUnit } from '../metadata/ome/units'
import {
  COORDINATE_CONVENTION,
  MAX_IMPORTED_REGIONS,
  type ExchangeImport,
  type ExchangeRegion,
} from './exchange.types'

const OME_NS = 'http://www.openmicroscopy.org/Schemas/OME/2016-06'

const escapeXml = (s: string) =>
  s.replace(
    /[<>&"']/g,
    (c) => ({ '<': '&lt;', '>': '&gt;', '&': '&amp;', '"': '&quot;', "'": '&apos;' })[c]!,
  )

const attrs = (pairs: [string, string | number | undefined][]) =>
  pairs
    .filter(([, v]) => v !== undefined)
    .map(([k, v]) => ` ${k}="${escapeXml(String(v))}"`)
    .join('')

/** OME Color: RGBA packed in a signed 32-bit integer. */
export function omeColour(hex: string): number {
  return (parseInt(hex.slice(1), 16) * 256 + 255) | 0
}
const hexColour = (value: number) => `#${((value >>> 8) & 0xffffff).toString(16).padStart(6, '0')}`

const points = (ring: readonly (readonly [number, number])[]) =>
  ring.map(([x, y]) => `${x},${y}`).join(' ')

/** An axis-aligned rectangle as [x, y, width, height], or null. */
function rectangleOf(
  ring: readonly (readonly [number, number])[],
): [number, number, number, number] | null {
  if (ring.length !== 5) return null
  const xs = new Set(ring.map((p) => p[0]))
  const ys = new Set(ring.map((p) => p[1]))
  if (xs.size !== 2 || ys.size !== 2) return null
  const edgesAxisAligned = ring
    .slice(1)
    .every((p, i) => p[0] === ring[i]![0] || p[1] === ring[i]![1])
  if (!edgesAxisAligned) return null
  const [x0, x1] = [...xs].sort((a, b) => a - b) as [number, number]
  const [y0, y1] = [...ys].sort((a, b) => a - b) as [number, number]
  return [x0, y0, x1 - x0, y1 - y0]
}

function shapeXml(g: RegionGeometry, id: string, style: string): string {
  switch (g.type) {
    case 'Polygon': {
      const ring = g.coordinates[0]!
      const rect = rectangleOf(ring)
      if (rect) {
        const [x, y, w, h] = rect
        return `<Rectangle ID="${id}"${style}${attrs([
          ['X', x],
          ['Y', y],
          ['Width', w],
          ['Height', h],
        ])}/>`
      }
      return `<Polygon ID="${id}"${style}${attrs([['Points', points(ring.slice(0, -1))]])}/>`
    }
    case 'Point':
      return `<Point ID="${id}"${style}${attrs([
        ['X', g.coordinates[0]],
        ['Y', g.coordinates[1]],
      ])}/>`
    case 'LineString': {
      const width = attrs([
        ['StrokeWidth', g.width],
        ['StrokeWidthUnit', 'nm'],
      ])
      if (g.coordinates.length === 2) {
        const [[x1, y1], [x2, y2]] = g.coordinates as [[number, number], [number, number]]
        return `<Line ID="${id}"${style}${width}${attrs([
          ['X1', x1],
          ['Y1', y1],
          ['X2', x2],
          ['Y2', y2],
        ])}/>`
      }
      return `<Polyline ID="${id}"${style}${width}${attrs([['Points', points(g.coordinates)]])}/>`
    }
    case 'Ellipse': {
      const [cx, cy] = g.center
      const a = (g.rotation * Math.PI) / 180
      const c = Math.cos(a)
      const s = Math.sin(a)
      // Rotation about the centre: x' = c·x − s·y + (cx − c·cx + s·cy), y' = s·x + c·y + (cy − s·cx − c·cy).
      const transform = attrs([
        ['A00', c],
        ['A01', -s],
        ['A02', cx - c * cx + s * cy],
        ['A10', s],
        ['A11', c],
        ['A12', cy - s * cx - c * cy],
      ])
      const body = g.rotation ? `><Transform${transform}/></Ellipse>` : '/>'
      return `<Ellipse ID="${id}"${style}${attrs([
        ['X', cx],
        ['Y', cy],
        ['RadiusX', g.radii[0]],
        ['RadiusY', g.radii[1]],
      ])}${body}`
    }
  }
}

export interface OmeRoiFrame {
  /** Name of the table the regions belong to. */
  name: string
  /** Extent of the table's frame, nm (the image's size in 1 nm pixels). */
  widthNm: number
  heightNm: number
}

export function regionsToOmeXml(regions: ExchangeRegion[], frame: OmeRoiFrame): string {
  const size = (v: number) => Math.max(1, Math.ceil(v))
  const roiRefs = regions.map((_, i) => `    <ROIRef ID="ROI:${i + 1}"/>`)
  const rois = regions.map((r, i) => {
    const style = attrs([
      ['StrokeColor', r.colour ? omeColour(r.colour) : undefined],
      ['Text', r.label],
    ])
    return [
      `  <ROI${attrs([
        ['ID', `ROI:${i + 1}`],
        ['Name', r.label],
      ])}>`,
      `    <Union>${shapeXml(r.geometry, `Shape:${i + 1}`, style)}</Union>`,
      `    <Description>${escapeXml(`Coordinates in nm: ${COORDINATE_CONVENTION}`)}</Description>`,
      '  </ROI>',
    ].join('\n')
  })
  return [
    '<?xml version="1.0" encoding="UTF-8"?>',
    `<OME xmlns="${OME_NS}" xmlns:xsi="http://www.w3.org/2001/XMLSchema-instance" xsi:schemaLocation="${OME_NS} ${OME_NS}/ome.xsd" Creator="Stipple">`,
    `  <Image ID="Image:0"${attrs([['Name', `${frame.name} (regions frame, 1 pixel = 1 nm)`]])}>`,
    `    <Description>${escapeXml(`The frame of the regions below, not an image: ${COORDINATE_CONVENTION} One pixel of this image is 1 nm.`)}</Description>`,
    `    <Pixels ID="Pixels:0" DimensionOrder="XYZCT" Type="uint8"${attrs([
      ['SizeX', size(frame.widthNm)],
      ['SizeY', size(frame.heightNm)],
    ])} SizeZ="1" SizeC="1" SizeT="1" PhysicalSizeX="1" PhysicalSizeXUnit="nm" PhysicalSizeY="1" PhysicalSizeYUnit="nm">`,
    '      <MetadataOnly/>',
    '    </Pixels>',
    ...roiRefs,
    '  </Image>',
    ...rois,
    '</OME>',
    '',
  ].join('\n')
}

const SHAPES = [
  'Rectangle',
  'Polygon',
  'Ellipse',
  'Point',
  'Line',
  'Polyline',
  'Mask',
  'Label',
] as const

const list = (v: unknown): XmlNode[] =>
  Array.isArray(v) ? (v as XmlNode[]) : v ? [v as XmlNode] : []
const num = (node: XmlNode, name: string) => Number(node[`@${name}`])

function parsePoints(text: unknown): [number, number][] {
  return String(text ?? '')
    .trim()
    .split(/\s+/)
    .filter(Boolean)
    .map((pair) => pair.split(',').map(Number) as [number, number])
}

/** nm per pixel of the image that references each ROI (ROIs without one: 1, with a note). */
function scalesByRoi(ome: XmlNode, notes: string[]): Map<string, number> {
  const scales = new Map<string, number>()
  for (const image of list(ome.Image)) {
    const pixels = list(image.Pixels)[0]
    const size = pixels ? Number(pixels['@PhysicalSizeX']) : NaN
    const unit = String(pixels?.['@PhysicalSizeXUnit'] ?? OME_DEFAULT_UNITS.physicalSize)
    const nm = Number.isFinite(size) ? toStippleUnit(size, unit, 'length') : null
    if (nm === null)
      notes.push(
        `image ${String(image['@ID'])} has no physical pixel size; its ROIs are read as nm`,
      )
    for (const ref of list(image.ROIRef)) scales.set(String(ref['@ID']), nm ?? 1)
  }
  return scales
}

/** Regions from an OME-XML document's ROIs (each shape of a ROI's Union becomes one region). */
export function regionsFromOmeXml(xml: string): ExchangeImport {
  const ome = parseOmeXml(xml)
  const notes: string[] = []
  const scales = scalesByRoi(ome, notes)
  const result: ExchangeImport = { regions: [], skipped: [], coordinates: '' }
  for (const roi of list(ome.ROI)) {
    const roiId = String(roi['@ID'])
    const scale = scales.get(roiId) ?? 1
    if (!scales.has(roiId)) notes.push(`${roiId} belongs to no image; read as nm`)
    const union = list(roi.Union)[0] ?? {}
    for (const kind of SHAPES)
      for (const shape of list(union[kind])) {
        const item = `${roiId} ${kind} ${String(shape['@ID'] ?? '')}`.trim()
        if (result.regions.length >= MAX_IMPORTED_REGIONS) {
          result.skipped.push({ item, reason: `more than ${MAX_IMPORTED_REGIONS} regions` })
          continue
        }
        const geometry = geometryOf(kind, shape, scale)
        if (typeof geometry === 'string') {
          result.skipped.push({ item, reason: geometry })
          continue
        }
        const colour =
          shape['@StrokeColor'] !== undefined ? hexColour(Number(shape['@StrokeColor'])) : undefined
        const label = String(roi['@Name'] ?? shape['@Text'] ?? roiId).slice(0, 200)
        result.regions.push({ label, ...(colour ? { colour } : {}), geometry })
      }
  }
  result.coordinates = notes.length
    ? `Pixel coordinates scaled by each image's physical pixel size; ${[...new Set(notes)].join('; ')}.`
    : "Pixel coordinates scaled by each image's physical pixel size to nm."
  return result
}

function geometryOf(
  kind: (typeof SHAPES)[number],
  s: XmlNode,
  scale: number,
): RegionGeometry | string {
  const at = (v: number) => v * scale
  let candidate: unknown
  switch (kind) {
    case 'Rectangle': {
      const [x, y, w, h] = ['X', 'Y', 'Width', 'Height'].map((n) => at(num(s, n))) as [
        number,
        number,
        number,
        number,
      ]
      candidate = {
        type: 'Polygon',
        coordinates: [
          [
            [x, y],
            [x + w, y],
            [x + w, y + h],
            [x, y + h],
            [x, y],
          ],
        ],
      }
      break
    }
    case 'Polygon': {
      const ring = parsePoints(s['@Points']).map(([x, y]) => [at(x), at(y)] as [number, number])
      candidate = { type: 'Polygon', coordinates: [[...ring, ring[0]]] }
      break
    }
    case 'Ellipse': {
      const transform = list(s.Transform)[0]
      // A rotation (with any translation) keeps A00 = A11 and A01 = −A10; other transforms are refused.
      const a00 = transform ? num(transform, 'A00') : 1
      const a10 = transform ? num(transform, 'A10') : 0
      if (
        transform &&
        (Math.abs(a00 - num(transform, 'A11')) > 1e-9 ||
          Math.abs(num(transform, 'A01') + a10) > 1e-9)
      )
        return 'an ellipse transformed other than by a rotation'
      const cx = num(s, 'X')
      const cy = num(s, 'Y')
      const centre = transform
        ? [
            a00 * cx + num(transform, 'A01') * cy + num(transform, 'A02'),
            a10 * cx + num(transform, 'A11') * cy + num(transform, 'A12'),
          ]
        : [cx, cy]
      candidate = {
        type: 'Ellipse',
        center: centre.map(at),
        radii: [at(num(s, 'RadiusX')), at(num(s, 'RadiusY'))],
        rotation: (Math.atan2(a10, a00) * 180) / Math.PI,
      }
      break
    }
    case 'Point':
      candidate = { type: 'Point', coordinates: [at(num(s, 'X')), at(num(s, 'Y'))] }
      break
    case 'Line':
    case 'Polyline': {
      const line =
        kind === 'Line'
          ? [
              [num(s, 'X1'), num(s, 'Y1')],
              [num(s, 'X2'), num(s, 'Y2')],
            ]
          : parsePoints(s['@Points'])
      const strokeUnit = String(s['@StrokeWidthUnit'] ?? 'pixel')
      const stroke = Number(s['@StrokeWidth'] ?? NaN)
      const width =
        strokeUnit === 'pixel' ? stroke * scale : toStippleUnit(stroke, strokeUnit, 'length')
      if (!(width !== null && width > 0))
        return 'a line without a stroke width (the band a profile takes in)'
      candidate = { type: 'LineString', coordinates: line.map(([x, y]) => [at(x!), at(y!)]), width }
      break
    }
    default:
      return `${kind} shapes are not regions here`
  }
  const parsed = regionGeometrySchema.safeParse(candidate)
  return parsed.success
    ? parsed.data
    : `invalid ${kind}: ${parsed.error.issues[0]?.message ?? 'bad values'}`
}
