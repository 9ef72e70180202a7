import { Router } from 'express'
import { z } from 'zod'
import {
  measurementQuerySchema,
  type MeasurementResult,
} from '@shared/schemas/region-measurement.schema'
import { createRegionSchema } from '@shared/schemas/region.schema'
import { MeasurementRefusedError, RegionMeasurer } from '../../compute/regions'
import { BadRequestError, ConflictError, HttpError, NotFoundError } from '../../errors/http-error'
import { requireUser } from '../../http/authenticate'
import { requestEm as em } from '../../http/request-context'
import { parseBody, parseQuery } from '../../http/validate'
import type { AppDeps } from '../../services'
import { DatasetFile, type IDatasetFile } from '../files/dataset-file.entity'
import { LocalizationStores } from '../preview/localization-stores'
import { previewTableOf } from '../preview/preview-tables'
import {
  regionsFromGeoJson,
  regionsFromOmeXml,
  regionsToGeoJson,
  regionsToOmeXml,
  type ExchangeImport,
} from '../region-exchange'
import { tableFor, visibleRegion } from '../regions/region-access'
import { listRegions, type RegionsService } from '../regions/regions.service'
import { MeasurementCache } from './measurement-cache'

const exportQuery = z.strictObject({ format: z.enum(['geojson', 'ome-xml']).default('geojson') })
const importBody = z.strictObject({
  format: z.enum(['geojson', 'ome-xml']),
  /** The file's text (GeoJSON or OME-XML). */
  content: z.string().min(1).max(900_000),
})

/** 422: the request is understood, but the region or its parameters are beyond what is measured. */
class MeasurementRefused extends HttpError {
  constructor(detail: string) {
    super(422, 'Measurement refused', detail, '/problems/measurement-refused')
  }
}

/**
 * Measurements of a region (reading follows the preview right, like the region itself) and the
 * exchange of a table's regions as GeoJSON or OME-XML ROIs (export: preview; import: annotate).
 */
export function regionMeasurementsRouter(
  deps: Pick<AppDeps, 'storage' | 'previews'>,
  regions: RegionsService,
): Router {
  const router = Router()
  const measurer = new RegionMeasurer()
  const cache = new MeasurementCache()
  // The preview's, so a node checks a store against the bucket once for both.
  const stores = deps.previews?.stores ?? new LocalizationStores(deps.storage)

  /** The table's store and its write time; 409 while the table has not been read. */
  const storeOf = async (file: IDatasetFile) => {
    const store = file.kind === 'localization_table' ? await stores.open(file) : null
    if (!store)
      throw new ConflictError(
        `"${file.name}" has not been read yet; its regions can be measured once it is.`,
      )
    return store
  }

  router.get('/regions/:id/measurements', async (req, res) => {
    const query = parseQuery(measurementQuerySchema, req)
    const { region } = await visibleRegion(req)
    const file = await em().findOne(DatasetFile, { id: region.file })
    if (!file) throw new NotFoundError('region', region.id)
    const store = await storeOf(file)
    const key = MeasurementCache.key(region.id, region.geometry, query, store.mtimeMs)
    const kept = cache.get(key)
    if (kept) {
      res.json({ ...kept, computeMs: 0, cached: true } as MeasurementResult)
      return
    }
    const started = performance.now()
    try {
      const measured = await measurer.measure(store.arrowPath, region.geometry, query)
      cache.set(key, measured)
      res.json({
        ...measured,
        computeMs: Math.round(performance.now() - started),
        cached: false,
      } as MeasurementResult)
    } catch (err) {
      if (err instanceof MeasurementRefusedError) throw new MeasurementRefused(err.message)
      throw err
    }
  })

  router.get('/datasets/:id/files/:fileId/regions/export', async (req, res) => {
    const { dataset, file } = await tableFor(req, 'preview')
    const { format } = parseQuery(exportQuery, req)
    const items = (await listRegions(em(), req, dataset, file.id)).map((r) => ({
      label: r.label,
      colour: r.colour,
      geometry: r.geometry,
    }))
    const base = `${dataset.accession}-${file.id}-regions`
    if (format === 'geojson') {
      res
        .type('application/geo+json')
        .attachment(`${base}.geojson`)
        .send(JSON.stringify(regionsToGeoJson(items), null, 1))
      return
    }
    const bounds = deps.previews ? (await deps.previews.info(previewTableOf(file))).boundsNm : null
    const xml = regionsToOmeXml(items, {
      name: file.name,
      widthNm: Math.max(bounds?.xMax ?? 1, ...items.flatMap((r) => extentOf(r.geometry)[0])),
      heightNm: Math.max(bounds?.yMax ?? 1, ...items.flatMap((r) => extentOf(r.geometry)[1])),
    })
    res.type('application/xml').attachment(`${base}.ome.xml`).send(xml)
  })

  router.post('/datasets/:id/files/:fileId/regions/import', requireUser, async (req, res) => {
    const { dataset, file } = await tableFor(req, 'annotate')
    const body = parseBody(importBody, req)
    let parsed: ExchangeImport
    try {
      parsed =
        body.format === 'geojson'
          ? regionsFromGeoJson(JSON.parse(body.content))
          : regionsFromOmeXml(body.content)
    } catch (err) {
      if (err instanceof HttpError) throw err
      throw new BadRequestError(
        err instanceof SyntaxError ? 'The GeoJSON is not valid JSON.' : (err as Error).message,
      )
    }
    if (!deps.previews) throw new Error('createApp makes the preview service')
    const bounds = (await deps.previews.info(previewTableOf(file))).boundsNm
    const created = []
    const skipped = [...parsed.skipped]
    for (const [n, region] of parsed.regions.entries()) {
      const input = createRegionSchema.safeParse(region)
      if (!input.success) {
        skipped.push({
          item: `region ${n + 1}`,
          reason: input.error.issues[0]?.message ?? 'invalid',
        })
        continue
      }
      try {
        created.push(await regions.create(em(), req, dataset, file.id, bounds, input.data))
      } catch (err) {
        if (!(err instanceof HttpError) || err.status >= 500) throw err
        skipped.push({ item: `region ${n + 1} (${region.label})`, reason: err.detail ?? err.title })
      }
    }
    res.status(201).json({ created, skipped, coordinates: parsed.coordinates })
  })

  return router
}

/** Largest x and y a geometry reaches, for the size of the OME frame image. */
function extentOf(g: z.infer<typeof createRegionSchema>['geometry']): [number[], number[]] {
  switch (g.type) {
    case 'Polygon':
      return [g.coordinates[0]!.map((p) => p[0]), g.coordinates[0]!.map((p) => p[1])]
    case 'LineString':
      return [g.coordinates.map((p) => p[0] + g.width), g.coordinates.map((p) => p[1] + g.width)]
    case 'Point':
      return [[g.coordinates[0]], [g.coordinates[1]]]
    case 'Ellipse':
      return [[g.center[0] + Math.max(...g.radii)], [g.center[1] + Math.max(...g.radii)]]
  }
}
