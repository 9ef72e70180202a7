import express, { Router } from 'express'
import { z } from 'zod'
import { metadataSchema } from '@shared/metadata/metadata.schema'
import { metadataJsonSchema } from '@shared/metadata/vocabulary'
import { idSchema } from '@shared/schemas/common.schema'
import { BadRequestError } from '../../errors/http-error'
import { requireUser } from '../../http/authenticate'
import { requestEm as em } from '../../http/request-context'
import { parseBody, parseParams } from '../../http/validate'
import type { AppDeps } from '../../services'
import { datasetFor, datasetParams } from '../datasets/dataset-access'
import { projectFor } from '../projects/projects.service'
import { toDataCite } from './exports/datacite'
import { toJsonLd } from './exports/json-ld'
import { methodsSummary } from './exports/methods-text'
import {
  completenessOf,
  exportSubject,
  metadataOf,
  projectSuggestions,
  saveMetadata,
} from './metadata.service'
import { exportOmeXml } from './ome/ome-export'
import { importOmeXml } from './ome/ome-import'
import { MAX_OME_XML_BYTES } from './ome/ome-parse'
import { anonymousReview } from '../reviewer-links/reviewer-access'
import { anonymiseExport, anonymiseMetadata } from '../reviewer-links/anonymise'

export const EXPORT_FORMATS = ['ome-xml', 'datacite', 'jsonld', 'methods'] as const
const exportParams = datasetParams.extend({
  format: z.enum(EXPORT_FORMATS, { error: `Export as one of ${EXPORT_FORMATS.join(', ')}` }),
})

/** Routes under /api/datasets/:id for a dataset's description. */
export function datasetMetadataRouter(deps: AppDeps): Router {
  const router = Router({ mergeParams: true })
  const target = (req: Parameters<typeof datasetFor>[0], action: 'read' | 'edit') =>
    datasetFor(req, em(), parseParams(datasetParams, req).id, action)

  router.get('/metadata', async (req, res) => {
    const dataset = await target(req, 'read')
    const stored = await metadataOf(em(), dataset.id)
    const metadata = anonymousReview(req, dataset) ? anonymiseMetadata(stored) : stored
    res.json({ metadata, completeness: await completenessOf(em(), dataset) })
  })

  router.put('/metadata', requireUser, async (req, res) => {
    const dataset = await target(req, 'edit')
    res.json(await saveMetadata(em(), req, dataset, parseBody(metadataSchema, req)))
  })

  router.get('/completeness', async (req, res) => {
    res.json(await completenessOf(em(), await target(req, 'read')))
  })

  router.get('/export/:format', async (req, res) => {
    const { format } = parseParams(exportParams, req)
    const dataset = await target(req, 'read')
    const full = await exportSubject(em(), dataset, deps.config.publicUrl)
    const subject = anonymousReview(req, dataset) ? anonymiseExport(full) : full
    const name = `${dataset.accession}-v${dataset.version}`
    switch (format) {
      case 'ome-xml':
        res
          .type('application/xml')
          .attachment(`${name}.ome.xml`)
          .send(exportOmeXml(subject.metadata, subject))
        return
      case 'datacite':
        res
          .type('application/vnd.datacite.datacite+json')
          .attachment(`${name}.datacite.json`)
          .send(JSON.stringify(toDataCite(subject), null, 2))
        return
      case 'jsonld':
        res.type('application/ld+json').send(JSON.stringify(toJsonLd(subject), null, 2))
        return
      case 'methods':
        res.type('text/plain; charset=utf-8').send(methodsSummary(subject))
    }
  })
  return router
}

/** /api/vocabulary, /api/metadata/import and /api/projects/:id/suggestions. */
export function metadataRouter(): Router {
  const router = Router()
  router.get('/vocabulary', (_req, res) => {
    res.set('cache-control', 'public, max-age=300').json(metadataJsonSchema())
  })
  router.post(
    '/metadata/import',
    requireUser,
    express.text({ type: ['application/xml', 'text/xml', 'text/plain'], limit: MAX_OME_XML_BYTES }),
    (req, res) => {
      if (typeof req.body !== 'string' || !req.body.trim()) {
        throw new BadRequestError(
          'Send the OME-XML document as the request body with Content-Type: application/xml.',
        )
      }
      res.json(importOmeXml(req.body))
    },
  )
  router.get('/projects/:id/suggestions', requireUser, async (req, res) => {
    const { id } = parseParams(z.object({ id: idSchema }), req)
    await projectFor(em(), req, id, 'read')
    res.json(await projectSuggestions(em(), req, id))
  })
  return router
}
