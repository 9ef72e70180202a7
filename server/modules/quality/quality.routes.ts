import { Router } from 'express'
import { idSchema } from '@shared/schemas/common.schema'
import { NotFoundError } from '../../errors/http-error'
import { requestEm as em } from '../../http/request-context'
import { parseParams } from '../../http/validate'
import { datasetFor, datasetParams } from '../datasets/dataset-access'
import { DatasetFile } from '../files/dataset-file.entity'
import { qualityReportOf } from './quality.service'

const fileParams = datasetParams.extend({ fileId: idSchema })

/** A table's quality report: those who may see the dataset's previews may read it. */
export function qualityRouter(): Router {
  const router = Router({ mergeParams: true })
  router.get('/files/:fileId/quality', async (req, res) => {
    const { id, fileId } = parseParams(fileParams, req)
    const dataset = await datasetFor(req, em(), id, 'preview')
    const file = await em().findOne(DatasetFile, { id: fileId, dataset: dataset.id })
    if (!file) throw new NotFoundError('file', fileId)
    res.json(await qualityReportOf(em(), file))
  })
  return router
}
