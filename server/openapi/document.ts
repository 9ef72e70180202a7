import { OpenAPIRegistry, OpenApiGeneratorV31 } from '@asteasolutions/zod-to-openapi'
import { registerAuditPaths } from '../modules/audit/audit.openapi'
import { registerAdminUserPaths } from '../modules/users/admin-users.openapi'
import { registerCommentPaths } from '../modules/comments/comments.openapi'
import { registerDatasetPaths } from '../modules/datasets/datasets.openapi'
import { registerFilePaths } from '../modules/files/files.openapi'
import { registerMetadataPaths } from '../modules/metadata/metadata.openapi'
import { registerProjectPaths } from '../modules/projects/projects.openapi'
import { registerPreviewPaths, registerQualityPaths } from '../modules/quality/quality.openapi'
import { registerMePaths } from '../modules/users/me.openapi'
import { registerSearchPaths } from '../modules/search/search.openapi'
import { registerVersionPaths } from '../modules/versions/versions.openapi'
import { registerRegionPaths } from '../modules/regions/regions.openapi'
import { z } from 'zod'

/** The OpenAPI 3.1 description of /api, generated from the same zod schemas the routes use. */
export function buildOpenApiDocument(publicUrl: string) {
  const registry = new OpenAPIRegistry()
  registry.registerComponent('securitySchemes', 'session', {
    type: 'apiKey',
    in: 'cookie',
    name: 'stipple.sid',
  })
  registry.registerComponent('securitySchemes', 'bearer', {
    type: 'http',
    scheme: 'bearer',
    description:
      'A personal access token from your profile page (or `npm run admin -- token create`).',
  })
  registry.registerPath({
    method: 'get',
    path: '/api/health',
    summary: 'Liveness check',
    tags: ['Service'],
    responses: {
      200: {
        description: 'OK',
        content: { 'application/json': { schema: z.object({ status: z.literal('ok') }) } },
      },
    },
  })
  registerMePaths(registry)
  registerProjectPaths(registry)
  registerDatasetPaths(registry)
  registerFilePaths(registry)
  registerQualityPaths(registry)
  registerPreviewPaths(registry)
  registerCommentPaths(registry)
  registerRegionPaths(registry)
  registerMetadataPaths(registry)
  registerAuditPaths(registry)
  registerSearchPaths(registry)
  registerAdminUserPaths(registry)
  registerVersionPaths(registry)
  return new OpenApiGeneratorV31(registry.definitions).generateDocument({
    openapi: '3.1.0',
    info: {
      title: 'Stipple API',
      version: '0.1.0',
      description:
        'Deposit, check, discuss and release single-molecule localization microscopy data. Errors are application/problem+json (RFC 9457).',
    },
    servers: [{ url: publicUrl }],
  })
}
