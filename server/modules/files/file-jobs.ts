import { z } from 'zod'
import {
  columnMappingSchema,
  tableFormatChoiceSchema,
  type ColumnMappingInput,
} from '@shared/schemas/localization-mapping.schema'
import type { EntityManager } from '@mikro-orm/better-sqlite'
import { defineJobKind } from '../../jobs/job-kind'
import { enqueue } from '../../jobs/job-queue'
import type { AppConfig } from '../../config'
import { Dataset } from '../datasets/dataset.entity'
import { projectBytesUsed } from './project-usage'
import type { LocalStorage } from '../../storage/local-storage'
import { Job } from '../../jobs/job.entity'
import { DatasetFile, type IDatasetFile } from './dataset-file.entity'

const onFile = (p: { fileId: number }) => ({ type: 'file' as const, id: p.fileId })
const fileId = z.int().positive()
/** A deposited file's storage key (`<dataset>/<upload id>`), resolved by the worker's storage. */
const storageKey = z.string().min(1).max(200)

/** Reads a localization table's format and header and proposes a column mapping. */
export const inspectTableJob = defineJobKind({
  name: 'inspect-table',
  payload: z.object({ fileId, sourceKey: storageKey, format: tableFormatChoiceSchema.nullish() }),
  subject: onFile,
})

/** What one table may cost, fixed when the ingest is queued (see IngestLimits). */
const ingestLimits = z.object({
  maxExpansion: z.number().positive(),
  maxRows: z.number().positive(),
  maxOutputBytes: z.number().min(0),
})

/** Parses, validates and converts a whole table into the tile-ordered localization store. */
export const ingestTableJob = defineJobKind({
  name: 'ingest-table',
  payload: z.object({
    fileId,
    sourceKey: storageKey,
    mapping: columnMappingSchema,
    format: tableFormatChoiceSchema.nullish(),
    limits: ingestLimits.optional(),
  }),
  subject: onFile,
  after: ['inspect-table'],
  // A large table's buffers go back to the system with its thread.
  freshThread: true,
})

/** Header, frame-mean trace and projection thumbnail of a raw stack (all parts of a file set). */
export const scanRawStackJob = defineJobKind({
  name: 'scan-raw-stack',
  payload: z.object({ fileId, sourceKey: storageKey, partKeys: z.array(storageKey).optional() }),
  subject: onFile,
})

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

/** Where a file's derived outputs go; the same on both threads, from the file id alone. */
const COLUMNAR_STORE = 'localizations.arrow'

/** Where a table's localization store is, for readers (the folder is not created). */
export const columnarStoreOf = (storage: LocalStorage, fileId: number) =>
  storage.derivedLocation(fileId, COLUMNAR_STORE)

export function derivedPaths(storage: LocalStorage, fileId: number) {
  return {
    columnar: storage.derivedPath(fileId, COLUMNAR_STORE),
    thumbnail: storage.derivedPath(fileId, 'projection.png'),
    trace: storage.derivedPath(fileId, 'frame-means.json'),
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
