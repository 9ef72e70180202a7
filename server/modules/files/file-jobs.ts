import type { ColumnMappingInput } from '@shared/schemas/localization-mapping.schema'
import type { EntityManager } from '@mikro-orm/better-sqlite'
import { enqueue } from '../../jobs/job-queue'
import type { AppConfig } from '../../config'
import { Dataset } from '../datasets/dataset.entity'
import { projectBytesUsed } from './project-usage'
import { Job } from '../../jobs/job.entity'
import { DatasetFile, type IDatasetFile } from './dataset-file.entity'
import { ingestTableJob, inspectTableJob, scanRawStackJob } from './file-job-kinds'

/** The limits of an ingest queued now: the site's settings, and what the project has left. */
export async function ingestLimitsFor(
  em: EntityManager,
  config: Pick<AppConfig, 'ingest' | 'uploads'>,
  file: IDatasetFile,
) {
  const dataset = await em.findOneOrFail(Dataset, { id: file.dataset })
  // The table's own earlier store is replaced, so its bytes are free for the new one.
  const used = (await projectBytesUsed(em, dataset.project)) - file.derivedBytes
  return {
    ...config.ingest,
    maxOutputBytes: Math.max(0, config.uploads.projectQuotaBytes - used),
  }
}

/** Queues the first job a newly registered file needs, if any. */
export async function queueFirstJob(
  em: EntityManager,
  file: IDatasetFile,
  options: { priority?: number } = {},
): Promise<void> {
  const payload = { fileId: file.id, sourceKey: file.storageKey }
  if (file.kind === 'localization_table') await enqueue(em, inspectTableJob, payload, options)
  if (file.kind === 'raw_stack') await enqueue(em, scanRawStackJob, payload, options)
}

/**
 * Start-up repair: a file still "processing" must have work queued or running for it; one that
 * lost its job (an older release registered files and jobs in separate steps) gets it again —
 * the ingest when its mapping is known, else its first job.
 */
export async function queueMissingFileJobs(
  em: EntityManager,
  config: Pick<AppConfig, 'ingest' | 'uploads'>,
): Promise<number> {
  const waiting = await em.find(DatasetFile, { status: 'processing' })
  let queued = 0
  for (const file of waiting) {
    const active = await em.count(Job, {
      subjectType: 'file',
      subjectId: file.id,
      state: { $in: ['queued', 'running'] },
    })
    if (active) continue
    if (file.kind === 'localization_table' && file.mapping) {
      await enqueue(em, ingestTableJob, {
        fileId: file.id,
        sourceKey: file.storageKey,
        // Checked against the mapping schema by enqueue().
        mapping: file.mapping as ColumnMappingInput,
        limits: await ingestLimitsFor(em, config, file),
      })
    } else await queueFirstJob(em, file)
    queued++
  }
  await em.flush()
  return queued
}
