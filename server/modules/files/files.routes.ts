import { Router } from 'express'
import { requestEm as em } from '../../http/request-context'
import { parseParams } from '../../http/validate'
import { datasetFor, datasetParams } from '../datasets/dataset-access'
import { DatasetFile } from './dataset-file.entity'

/**
 * A dataset's files. The list is part of the description (names, sizes, checksums); the bytes and
 * the checksum manifest need the download right, which an embargo withholds.
 */
export function filesRouter(): Router {
  const router = Router({ mergeParams: true })

  router.get('/files', async (req, res) => {
    const dataset = await datasetFor(req, em(), parseParams(datasetParams, req).id, 'read')
    const files = await em().find(DatasetFile, { dataset: dataset.id }, { orderBy: { name: 'asc' } })
    res.json({
      items: files.map((f) => ({
        id: f.id,
        name: f.name,
        size: f.size,
        sha256: f.sha256 ?? null,
        kind: f.kind,
        status: f.status,
        createdAt: f.createdAt.toISOString(),
      })),
    })
  })

  /** One line per ready file, `<sha256>  <name>`, as `sha256sum -c` reads it. */
  router.get('/manifest.txt', async (req, res) => {
    const dataset = await datasetFor(req, em(), parseParams(datasetParams, req).id, 'download')
    const files = await em().find(DatasetFile, { dataset: dataset.id, status: 'ready', sha256: { $ne: null } }, { orderBy: { name: 'asc' } })
    res
      .type('text/plain; charset=utf-8')
      .set('content-disposition', `inline; filename="${dataset.accession}-manifest.txt"`)
      .send(files.map((f) => `${f.sha256}  ${f.name}\n`).join(''))
  })

  return router
}
