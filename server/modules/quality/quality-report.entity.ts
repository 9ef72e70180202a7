import { defineEntity, p, type InferEntity } from '@mikro-orm/core'
import type { QualityFindings } from '@shared/schemas/quality.schema'
import { DatasetFile } from '../files/dataset-file.entity'

/**
 * The latest quality report of a localization table: what the metrics found and the description
 * values they used. Replaced whenever the table is ingested again (a new mapping); it goes when
 * the file goes.
 */
export const QualityReport = defineEntity({
  name: 'QualityReport',
  properties: {
    id: p.integer().primary(),
    file: p.manyToOne(DatasetFile).mapToPk().deleteRule('cascade').unique(),
    findings: p.json<QualityFindings>(),
    inputs: p.json<Record<string, unknown>>(),
    computedAt: p.datetime(),
  },
})
export type IQualityReport = InferEntity<typeof QualityReport>
