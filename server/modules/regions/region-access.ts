import type { Request } from 'express'
import { z } from 'zod'
import { idSchema } from '@shared/schemas/common.schema'
import { NotFoundError } from '../../errors/http-error'
import { requestEm as em } from '../../http/request-context'
import { parseParams } from '../../http/validate'
import { datasetFor, datasetParams, subjectOf } from '../datasets/dataset-access'
import { Dataset } from '../datasets/dataset.entity'
import { DatasetFile } from '../files/dataset-file.entity'
import { Region } from './region.entity'

const fileParams = datasetParams.extend({ fileId: idSchema })
const regionParams = z.object({ id: idSchema })

/** `/datasets/:id/files/:fileId/…`: a localization table of a dataset the asker may `action`. */
export async function tableFor(req: Request, action: 'preview' | 'annotate') {
  const { id, fileId } = parseParams(fileParams, req)
  const dataset = await datasetFor(req, em(), id, action)
  const file = await em().findOne(DatasetFile, { id: fileId, dataset: dataset.id })
  if (!file || file.kind !== 'localization_table') throw new NotFoundError('table', fileId)
  return { dataset, file }
}

/**
 * `/regions/:id…`: the region and its dataset, 404 unless the asker may see the dataset's preview
 * (a region nobody may see does not exist for them).
 */
export async function visibleRegion(req: Request) {
  const { id } = parseParams(regionParams, req)
  const region = await em().findOne(Region, { id })
  const dataset = region && (await em().findOne(Dataset, { id: region.dataset }))
  if (!region || !dataset || !req.ability.can('preview', subjectOf(dataset)))
    throw new NotFoundError('region', id)
  return { region, dataset }
}
