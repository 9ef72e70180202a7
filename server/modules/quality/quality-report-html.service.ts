import type { EntityManager } from '@mikro-orm/better-sqlite'
import { tileQuerySchema } from '@shared/schemas/preview.schema'
import { HttpError } from '../../errors/http-error'
import type { Logger } from '../../logger'
import type { IDataset } from '../datasets/dataset.entity'
import type { IDatasetFile } from '../files/dataset-file.entity'
import type { PreviewService } from '../preview/preview.service'
import { previewTableOf } from '../preview/preview-tables'
import { fieldPicture, type FieldPicture } from './report-html/field-picture'
import { reportPage } from './report-html/report-page'
import { qualityReportOf } from './quality.service'

export interface QualityReportFile {
  html: string
  fileName: string
}

/**
 * The quality report of a table as one standalone HTML file: the same cards, verdicts and plots
 * as the quality page, every metric's method and parameters, and the whole field as a picture.
 */
export async function qualityReportHtml(
  em: EntityManager,
  deps: { previews?: PreviewService; logger?: Logger },
  dataset: IDataset,
  file: IDatasetFile,
): Promise<QualityReportFile> {
  const report = await qualityReportOf(em, file)
  if (report.status !== 'done')
    throw new HttpError(
      404,
      'Not found',
      `The quality report of "${file.name}" is not finished (${report.status}); it can be downloaded once it is done.`,
      '/problems/not-found',
    )
  let field: FieldPicture | null = null
  if (deps.previews)
    // A report without its picture is still worth having: say so in the page, log why.
    field = await pictureOf(deps.previews, file).catch((err: unknown) => {
      deps.logger?.error({ err, file: file.id }, 'quality report: the field picture failed')
      return null
    })
  return {
    html: reportPage({
      dataset: { accession: dataset.accession, title: dataset.title },
      fileName: file.name,
      report,
      field,
      generatedAt: new Date(),
    }),
    fileName: reportFileName(dataset.accession, file.name),
  }
}

/** The whole field from the preview's tiles, drawn with the default options (as the page opens). */
async function pictureOf(previews: PreviewService, entity: IDatasetFile): Promise<FieldPicture> {
  const file = previewTableOf(entity)
  const defaults = tileQuerySchema.parse({})
  return fieldPicture(await previews.info(file), (z, x, y) =>
    previews.tile(file, z, x, y, defaults),
  )
}

/**
 * `STPL-000001-spots-quality.html`: accession, the table's name without its extension, letters,
 * digits, dots, dashes and underscores only (Express's attachment() then encodes it for the header).
 */
export function reportFileName(accession: string, fileName: string): string {
  const stem = fileName.replace(/\.[^.]*$/, '') || fileName
  const safe = stem
    .replace(/[^\p{L}\p{N}._-]+/gu, '_')
    .replace(/^[._]+|_+$/g, '')
    .slice(0, 80)
  return `${accession}-${safe || 'table'}-quality.html`
}
