import { Router, type Request } from 'express'
import { idSchema } from '@shared/schemas/common.schema'
import { tileParamsSchema, tileQuerySchema } from '@shared/schemas/preview.schema'
import { NotFoundError } from '../../errors/http-error'
import { parseParams, parseQuery } from '../../http/validate'
import { authorise, datasetParams } from '../datasets/dataset-access'
import type { PreviewService } from './preview.service'

const fileParams = datasetParams.extend({ fileId: idSchema })
const tileParams = fileParams.extend(tileParamsSchema.shape)

/** The preview of a table: those who may see the dataset's previews may read it, on every tile. */
export function previewRouter(previews: PreviewService): Router {
  const router = Router({ mergeParams: true })

  async function tableOf(req: Request) {
    const { id, fileId } = parseParams(fileParams, req)
    const { dataset, table } = await previews.tables.find(id, fileId)
    authorise(req, dataset, id, 'preview')
    if (!table) throw new NotFoundError('file', fileId)
    return table
  }

  router.get('/files/:fileId/preview', async (req, res) => {
    res.json(await previews.viewerInfo(await tableOf(req)))
  })

  router.get('/files/:fileId/tiles/:z/:x/:y.png', async (req, res) => {
    const file = await tableOf(req)
    const { z, x, y } = parseParams(tileParams, req)
    const query = parseQuery(tileQuerySchema, req)
    const png = await previews.tile(file, z, x, y, query)
    // Private: the tile may show embargoed data to someone allowed to see it.
    res
      .writeHead(200, {
        'Content-Type': 'image/png',
        'Content-Length': png.length,
        'Cache-Control': 'private, max-age=300',
      })
      .end(png)
  })
  return router
}
