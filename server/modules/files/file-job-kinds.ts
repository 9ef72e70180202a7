import { z } from 'zod'
import {
  columnMappingSchema,
  tableFormatChoiceSchema,
} from '@shared/schemas/localization-mapping.schema'
import { defineJobKind } from '../../jobs/job-kind'
import type { LocalStorage } from '../../storage/local-storage'

/*
 * The kinds of work on deposited files and where their outputs go: what the job threads import,
 * so nothing here reaches the ORM or the queue (a thread loads only what its work needs).
 */

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
