import { Router, type Request } from 'express'
import { createRegionSchema, patchRegionSchema } from '@shared/schemas/region.schema'
import { ForbiddenError } from '../../errors/http-error'
import { requireUser } from '../../http/authenticate'
import { requestEm as em } from '../../http/request-context'
import { parseBody, parseParams } from '../../http/validate'
import type { AppDeps } from '../../services'
import { datasetFor, datasetParams, subjectOf } from '../datasets/dataset-access'
import { DatasetFile, type IDatasetFile } from '../files/dataset-file.entity'
import { previewTableOf } from '../preview/preview-tables'
import { tableFor, visibleRegion } from './region-access'
import { maySupervise } from './region-rules'
import { listRegions, type RegionsService } from './regions.service'

/**
 * Regions of interest: reading follows the preview right, drawing the annotate right; changing
 * or deleting one is for its author or an owner of the dataset's project.
 */
export function regionsRouter(deps: Pick<AppDeps, 'previews'>, regions: RegionsService): Router {
  const router = Router()

  /** The table's localization bounds in nm (409 while it has not been read). */
  const boundsOf = async (file: IDatasetFile) => {
    if (!deps.previews) throw new Error('createApp makes the preview service')
    return (await deps.previews.info(previewTableOf(file))).boundsNm
  }

  router.get('/datasets/:id/files/:fileId/regions', async (req, res) => {
    const { dataset, file } = await tableFor(req, 'preview')
    res.json({ items: await listRegions(em(), req, dataset, file.id) })
  })

  router.post('/datasets/:id/files/:fileId/regions', requireUser, async (req, res) => {
    const { dataset, file } = await tableFor(req, 'annotate')
    const input = parseBody(createRegionSchema, req)
    const region = await regions.create(em(), req, dataset, file.id, await boundsOf(file), input)
    res.status(201).location(`/api/regions/${region.id}`).json(region)
  })

  router.get('/datasets/:id/regions', async (req, res) => {
    const dataset = await datasetFor(req, em(), parseParams(datasetParams, req).id, 'preview')
    res.json({ items: await listRegions(em(), req, dataset) })
  })

  /** A region someone may change: 404 unless they may see it, 403 unless theirs to change. */
  async function changeable(req: Request) {
    const { region, dataset } = await visibleRegion(req)
    if (!req.ability.can('annotate', subjectOf(dataset)))
      throw new ForbiddenError(`Regions on ${dataset.accession} cannot be changed now.`)
    if (!maySupervise(req.viewer, dataset.project, region.author))
      throw new ForbiddenError('Only its author or an owner of the dataset can change a region.')
    return { region, dataset }
  }

  router.patch('/regions/:id', requireUser, async (req, res) => {
    const { region, dataset } = await changeable(req)
    const input = parseBody(patchRegionSchema, req)
    const file = input.geometry ? await em().findOne(DatasetFile, { id: region.file }) : null
    const bounds = file ? await boundsOf(file) : null
    res.json(await regions.update(em(), req, dataset, region, bounds, input))
  })

  router.delete('/regions/:id', requireUser, async (req, res) => {
    const { region, dataset } = await changeable(req)
    await regions.remove(em(), req, dataset, region)
    res.status(204).end()
  })
  return router
}
