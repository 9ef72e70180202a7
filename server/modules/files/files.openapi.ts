import type { OpenAPIRegistry } from '@asteasolutions/zod-to-openapi'
import { z } from 'zod'
import { FILE_KINDS, FILE_STATUSES } from '@shared/domain/files'
import {
  columnMappingSchema,
  tableFormatChoiceSchema,
} from '@shared/schemas/localization-mapping.schema'
import { fileValidationSchema } from '@shared/schemas/file-report.schema'
import { listOf, registerJsonRoute } from '../../openapi/registry'

const fileSchema = z
  .object({
    id: z.number(),
    name: z.string(),
    size: z.number(),
    sha256: z.string().nullable(),
    kind: z.enum(FILE_KINDS),
    status: z.enum(FILE_STATUSES),
    mediaType: z.string().nullable(),
    problem: z
      .string()
      .nullable()
      .describe('Why the file cannot be used, or what it waits for, in words'),
    summary: z.record(z.string(), z.unknown()).nullable(),
    job: z
      .object({ state: z.string(), progress: z.number(), message: z.string().nullable() })
      .nullable(),
    createdAt: z.string(),
  })
  .meta({ id: 'DatasetFile' })

export function registerFilePaths(registry: OpenAPIRegistry) {
  const tags = ['Files']
  const params = z.object({ idOrAccession: z.string() })
  const fileParams = params.extend({ fileId: z.number().int() })
  registerJsonRoute(registry, {
    method: 'get',
    path: '/api/datasets/{idOrAccession}/files',
    summary: "A dataset's files, with processing progress and the caller's unfinished uploads",
    tags,
    params,
    response: listOf(fileSchema),
    errors: [404],
  })
  registerJsonRoute(registry, {
    method: 'get',
    path: '/api/datasets/{idOrAccession}/files/{fileId}/validation',
    summary:
      'What validation or scanning found (rows by reject reason with examples and line numbers; stack dimensions)',
    description:
      'Follows the preview right. The first rows of a table and the text of rejected rows are included only for those who may download the file.',
    tags,
    params: fileParams,
    response: fileValidationSchema,
    errors: [403, 404],
  })
  registerJsonRoute(registry, {
    method: 'put',
    path: '/api/datasets/{idOrAccession}/files/{fileId}/mapping',
    summary:
      'Confirm or correct the column mapping of a localization table; the table is ingested again',
    tags,
    params: fileParams,
    body: columnMappingSchema,
    response: fileSchema,
    status: 202,
    errors: [400, 401, 403, 404, 409],
  })
  registerJsonRoute(registry, {
    method: 'put',
    path: '/api/datasets/{idOrAccession}/files/{fileId}/format',
    summary:
      'Say how the fields of a localization table are separated; its header and columns are read again',
    tags,
    params: fileParams,
    body: tableFormatChoiceSchema,
    response: fileSchema,
    status: 202,
    errors: [400, 401, 403, 404, 409],
  })
  registerJsonRoute(registry, {
    method: 'delete',
    path: '/api/datasets/{idOrAccession}/files/{fileId}',
    summary: 'Remove a file from a draft',
    tags,
    params: fileParams,
    status: 204,
    errors: [401, 403, 404],
  })
  registry.registerPath({
    method: 'get',
    path: '/api/datasets/{idOrAccession}/files/{fileId}/content',
    summary:
      'The original bytes; Range requests (RFC 9110), strong ETag, Repr-Digest and Content-Digest sha-256 (RFC 9530)',
    tags,
    request: { params: fileParams },
    responses: {
      200: { description: 'The whole file' },
      206: { description: 'The requested range' },
      304: { description: 'Not modified (If-None-Match)' },
      416: { description: 'Range not satisfiable' },
    },
  })
  registry.registerPath({
    method: 'get',
    path: '/api/datasets/{idOrAccession}/archive.zip',
    summary: 'The whole dataset as a streamed zip, with its SHA-256 manifest inside',
    tags,
    request: { params },
    responses: { 200: { description: 'application/zip' } },
  })
  registry.registerPath({
    method: 'post',
    path: '/api/uploads',
    summary:
      'Start a resumable upload (tus 1.0.0: creation, termination, expiration). Upload-Metadata: dataset (id or accession), filename',
    description:
      'Then PATCH the bytes to the returned Location, HEAD it to learn the offset after an interruption, DELETE it to cancel. The final PATCH answers with Stipple-File-Id. Refusals are problem+json bodies: 403 (not a depositor of a draft), 404, 413 (size limit or project quota), 400 (empty or duplicate file).',
    tags: ['Uploads'],
    responses: {
      201: { description: 'Created; Location is the upload URL' },
      413: { description: 'Too large or over quota' },
    },
  })
  registry.registerPath({
    method: 'get',
    path: '/api/datasets/{idOrAccession}/manifest.txt',
    summary:
      'SHA-256 manifest of the ready files, in the format `sha256sum -c` reads (needs the download right)',
    tags,
    request: { params },
    responses: {
      200: { description: 'One line per file', content: { 'text/plain': { schema: z.string() } } },
    },
  })
}
