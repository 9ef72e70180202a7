import { watch, type Ref } from 'vue'
import type OlMap from 'ol/Map'
import Collection from 'ol/Collection'
import Feature from 'ol/Feature'
import type { Geometry } from 'ol/geom'
import LineString from 'ol/geom/LineString'
import Point from 'ol/geom/Point'
import Polygon from 'ol/geom/Polygon'
import Draw, { createBox, type GeometryFunction } from 'ol/interaction/Draw'
import Modify from 'ol/interaction/Modify'
import VectorLayer from 'ol/layer/Vector'
import VectorSource from 'ol/source/Vector'
import { Circle, Fill, Stroke, Style } from 'ol/style'
import type { RegionDto, RegionShape } from '@/api/regions'
import { mapOutline, type Drawing } from '@/utils/regionGeometry'

/** From the centre to a corner of the ellipse's bounding box (axis-aligned). */
const ellipseFromDrag: GeometryFunction = (coordinates, geometry) => {
  const [centre, corner] = coordinates as number[][]
  const c = centre ?? [0, 0]
  const e = corner ?? c
  const radii: [number, number] = [
    Math.abs((e[0] ?? 0) - (c[0] ?? 0)),
    Math.abs((e[1] ?? 0) - (c[1] ?? 0)),
  ]
  const ring: number[][] = []
  for (let i = 0; i <= 64; i++) {
    const t = (2 * Math.PI * i) / 64
    ring.push([(c[0] ?? 0) + radii[0] * Math.cos(t), (c[1] ?? 0) + radii[1] * Math.sin(t)])
  }
  const polygon = (geometry as Polygon | undefined) ?? new Polygon([])
  polygon.setCoordinates([ring])
  polygon.set('ellipse', { centre: c, radii })
  return polygon
}

function drawingOf(shape: RegionShape, geometry: Geometry, lineWidthNm: number): Drawing | null {
  if (shape === 'ellipse') {
    const e = geometry.get('ellipse') as { centre: number[]; radii: [number, number] } | undefined
    return e && e.radii[0] > 0 && e.radii[1] > 0
      ? { shape, centre: e.centre, radii: e.radii }
      : null
  }
  if (geometry instanceof Polygon && (shape === 'rectangle' || shape === 'polygon'))
    return { shape, ring: geometry.getCoordinates()[0] ?? [] }
  if (geometry instanceof Point) return { shape: 'point', at: geometry.getCoordinates() }
  if (geometry instanceof LineString)
    return { shape: 'line', path: geometry.getCoordinates(), widthNm: lineWidthNm }
  return null
}

function olGeometry(region: RegionDto): Geometry {
  const outline = mapOutline(region.geometry)
  if (outline.kind === 'Polygon') return new Polygon([outline.ring])
  if (outline.kind === 'Point') return new Point(outline.at)
  return new LineString(outline.path)
}

/**
 * The regions as a vector layer on the preview map, the drawing tools (OpenLayers Draw) and
 * vertex editing of the selected region (Modify) for shapes whose vertices are their geometry.
 */
export function useRegionLayer(
  map: Readonly<Ref<OlMap | null>>,
  regions: Ref<RegionDto[]>,
  selected: Ref<number | null>,
  tool: Ref<RegionShape | null>,
  lineWidthNm: Ref<number>,
  on: {
    drawn: (d: Drawing) => void
    modified: (regionId: number, d: Drawing) => void
    picked: (regionId: number) => void
  },
) {
  const source = new VectorSource<Feature<Geometry>>()
  const layer = new VectorLayer({
    source,
    style: (feature, resolution) => {
      const region = feature.get('region') as RegionDto
      const chosen = region.id === selected.value
      const width =
        region.geometry.type === 'LineString'
          ? Math.max(2, region.geometry.width / resolution)
          : chosen
            ? 3
            : 2
      const stroke = new Stroke({ color: region.colour, width })
      return new Style({
        stroke:
          region.geometry.type === 'LineString'
            ? new Stroke({ color: `${region.colour}88`, width })
            : stroke,
        fill: new Fill({ color: `${region.colour}${chosen ? '40' : '1f'}` }),
        image: new Circle({
          radius: chosen ? 7 : 5,
          stroke,
          fill: new Fill({ color: region.colour }),
        }),
      })
    },
  })
  let draw: Draw | null = null
  let modify: Modify | null = null

  function rebuild() {
    source.clear()
    for (const region of regions.value) {
      const feature = new Feature(olGeometry(region))
      feature.setId(region.id)
      feature.set('region', region)
      source.addFeature(feature)
    }
    setUpModify()
  }

  function setUpTool() {
    const m = map.value
    if (!m) return
    if (draw) m.removeInteraction(draw)
    draw = null
    const shape = tool.value
    if (!shape) return
    draw =
      shape === 'rectangle'
        ? new Draw({ type: 'Circle', geometryFunction: createBox() })
        : shape === 'ellipse'
          ? new Draw({ type: 'Circle', geometryFunction: ellipseFromDrag })
          : new Draw({
              type: shape === 'point' ? 'Point' : shape === 'line' ? 'LineString' : 'Polygon',
            })
    draw.on('drawend', (e) => {
      const drawing = drawingOf(shape, e.feature.getGeometry()!, lineWidthNm.value)
      if (drawing) on.drawn(drawing)
    })
    m.addInteraction(draw)
  }

  function setUpModify() {
    const m = map.value
    if (!m) return
    if (modify) m.removeInteraction(modify)
    modify = null
    const feature = selected.value === null ? null : source.getFeatureById(selected.value)
    const region = feature?.get('region') as RegionDto | undefined
    if (!feature || !region?.canChange || !['polygon', 'point', 'line'].includes(region.shape))
      return
    modify = new Modify({ features: new Collection([feature]) })
    modify.on('modifyend', () => {
      const width = region.geometry.type === 'LineString' ? region.geometry.width : 0
      const drawing = drawingOf(region.shape, feature.getGeometry()!, width)
      if (drawing) on.modified(region.id, drawing)
    })
    m.addInteraction(modify)
  }

  function zoomTo(regionId: number) {
    const geometry = source.getFeatureById(regionId)?.getGeometry()
    const view = map.value?.getView()
    if (!geometry || !view) return
    view.fit(geometry.getExtent(), {
      padding: [48, 48, 48, 48],
      duration: 250,
      maxZoom: view.getMaxZoom(),
    })
  }

  watch(
    map,
    (m, old) => {
      if (old) old.removeLayer(layer)
      if (!m) return
      m.addLayer(layer)
      m.on('singleclick', (e) => {
        if (tool.value) return
        const hit = m.forEachFeatureAtPixel(e.pixel, (f) => f, { layerFilter: (l) => l === layer })
        if (hit) on.picked(Number(hit.getId()))
      })
      rebuild()
      setUpTool()
    },
    { immediate: true },
  )
  watch(regions, rebuild)
  watch(selected, () => {
    layer.changed()
    setUpModify()
  })
  watch(tool, setUpTool)
  return { zoomTo }
}
