import { watch, type Ref } from 'vue'
import type OlMap from 'ol/Map'
import Feature from 'ol/Feature'
import type { Geometry } from 'ol/geom'
import Point from 'ol/geom/Point'
import Polygon from 'ol/geom/Polygon'
import VectorLayer from 'ol/layer/Vector'
import VectorSource from 'ol/source/Vector'
import { Circle, Fill, Stroke, Style } from 'ol/style'
import { toMap } from '@/utils/previewGrid'

/** One cluster found in a region: its convex hull and centroid in table nm. */
export interface ClusterOutline {
  hull: [number, number][]
  centroid: [number, number]
}

/**
 * The clusters of the last DBSCAN measurement drawn back onto the preview: each convex hull as a
 * dashed outline (a cluster of one or two distinct positions as a dot at its centroid), above
 * the regions, ignored by clicks so the regions stay selectable underneath.
 */
export function useClusterOverlay(
  map: Readonly<Ref<OlMap | null>>,
  clusters: Ref<ClusterOutline[]>,
  colour: Readonly<Ref<string>>,
) {
  const source = new VectorSource<Feature<Geometry>>()
  const layer = new VectorLayer({
    source,
    zIndex: 20,
    style: () => {
      const stroke = new Stroke({ color: colour.value, width: 1.5, lineDash: [4, 3] })
      return new Style({
        stroke,
        fill: new Fill({ color: `${colour.value}33` }),
        image: new Circle({ radius: 3, fill: new Fill({ color: colour.value }) }),
      })
    },
  })
  layer.set('name', 'clusters')

  function rebuild() {
    source.clear()
    source.addFeatures(
      clusters.value.map(
        (c) =>
          new Feature(
            c.hull.length >= 3
              ? new Polygon([[...c.hull, c.hull[0]!].map(([x, y]) => toMap(x, y))])
              : new Point(toMap(c.centroid[0], c.centroid[1])),
          ),
      ),
    )
  }

  watch(
    map,
    (m, old) => {
      old?.removeLayer(layer)
      m?.addLayer(layer)
    },
    { immediate: true },
  )
  watch(clusters, rebuild, { immediate: true })
  watch(colour, () => layer.changed())
}
