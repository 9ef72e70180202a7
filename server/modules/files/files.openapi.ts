import type { OpenAPIRegistry } from '@asteasolutions/zod-to-openapi'
import { z } from 'zod'
import { FILE_KINDS, FILE_STATUSES } from '@shared/domain/files'
import { listOf, registerJsonRoute } from '../../openapi/registry'

const fileSchema = z
  .object({
    id: z.number(),
    name: z.string(),
    size: z.number(),
    sha256: z.string().nullable(),
    kind: z.enum(FILE_KINDS),
    status: z.enum(FILE_STATUSES),
    createdAt: z.string(),
  })
  .meta({ id: 'DatasetFile' })

export function registerFilePaths(registry: OpenAPIRegistry) {
  const tags = ['Files']
  const params = z.object({ idOrAccession: z.string() })
  registerJsonRoute(registry, { method: 'get', path: '/api/datasets/{idOrAccession}/files', summary: "A dataset's files", tags, params, response: listOf(fileSchema), errors: [404] })
  registry.registerPath({
    method: 'get',
    path: '/api/datasets/{idOrAccession}/manifest.txt',
    summary: 'SHA-256 manifest of the ready files, in the format `sha256sum -c` reads (needs the download right)',
    tags,
    request: { params },
    responses: { 200: { description: 'One line per file', content: { 'text/plain': { schema: z.string() } } } },
  })
}
