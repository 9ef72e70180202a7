import { Router, type Request } from 'express'
import { idSchema } from '@shared/schemas/common.schema'
import { NotFoundError } from '../../errors/http-error'
import { requestEm as em } from '../../http/request-context'
import { parseParams } from '../../http/validate'
import type { AppDeps } from '../../services'
import { datasetFor, datasetParams } from '../datasets/dataset-access'
import { DatasetFile } from '../files/dataset-file.entity'
import { datasetQualityOf } from './dataset-quality.service'
import { qualityReportHtml } from './quality-report-html.service'
import { qualityReportOf } from './quality.service'

const fileParams = datasetParams.extend({ fileId: idSchema })

/** Quality reports: those who may see the dataset's previews may read them, in every form. */
export function qualityRouter(deps: Partial<Pick<AppDeps, 'previews' | 'logger'>> = {}): Router {
  const router = Router({ mergeParams: true })

  async function tableOf(req: Request) {
    const { id, fileId } = parseParams(fileParams, req)
    const dataset = await datasetFor(req, em(), id, 'preview')
    const file = await em().findOne(DatasetFile, { id: fileId, dataset: dataset.id })
    if (!file) throw new NotFoundError('file', fileId)
    return { dataset, file }
  }

  router.get('/quality', async (req, res) => {
    const dataset = await datasetFor(req, em(), parseParams(datasetParams, req).id, 'preview')
    res.json(await datasetQualityOf(em(), dataset.id))
  })

  router.get('/files/:fileId/quality', async (req, res) => {
    res.json(await qualityReportOf(em(), (await tableOf(req)).file))
  })

  router.get('/files/:fileId/quality/report.html', async (req, res) => {
    const { dataset, file } = await tableOf(req)
    const report = await qualityReportHtml(em(), deps, dataset, file)
    // Private: the report may show embargoed data to someone allowed to see it.
    res
      .attachment(report.fileName)
      .type('text/html; charset=utf-8')
      .set('cache-control', 'private, no-store')
      .send(report.html)
  })
  return router
}
