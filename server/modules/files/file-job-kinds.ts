import { existsSync } from 'node:fs'
import { z } from 'zod'
import {
  columnMappingSchema,
  tableFormatChoiceSchema,
} from '@shared/schemas/localization-mapping.schema'
import { defineJobKind } from '../../jobs/job-kind'
import type { LocalStorage } from '../../storage/local-storage'
import { ObjectNotFoundError } from '../../storage/object-store'

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
/** The store's tile index, written beside it by the ingest (`<store>.index.json`). */
const COLUMNAR_INDEX = `${COLUMNAR_STORE}.index.json`
const THUMBNAIL = 'projection.png'
const TRACE = 'frame-means.json'

/** Where a table's localization store is, for readers (the folder is not created). */
export const columnarStoreOf = (storage: LocalStorage, fileId: number) =>
  storage.derivedLocation(fileId, COLUMNAR_STORE)

/** The keys of a table's store and of its index. */
export const columnarKeysOf = (storage: LocalStorage, fileId: number) => ({
  store: storage.derivedKey(fileId, COLUMNAR_STORE),
  index: storage.derivedKey(fileId, COLUMNAR_INDEX),
})

export function derivedPaths(storage: LocalStorage, fileId: number) {
  return {
    columnar: storage.derivedPath(fileId, COLUMNAR_STORE),
    thumbnail: storage.derivedPath(fileId, THUMBNAIL),
    trace: storage.derivedPath(fileId, TRACE),
  }
}

/** The keys of a raw stack's projection thumbnail and frame-mean trace. */
export const rawStackKeysOf = (storage: LocalStorage, fileId: number) => ({
  thumbnail: storage.derivedKey(fileId, THUMBNAIL),
  trace: storage.derivedKey(fileId, TRACE),
})

/**
 * The path of an up-to-date local copy of a table's store (fetched from the bucket when this node
 * has none or an older one). The index comes first: readers hold an index by the write time of
 * the store, so a store must never be newer here than its index.
 */
export async function localColumnarStoreOf(storage: LocalStorage, fileId: number) {
  const keys = columnarKeysOf(storage, fileId)
  await storage.mirror.localCopy(keys.index)
  return storage.mirror.localCopy(keys.store)
}

/** Sends a store written on this node, and its index, to the bucket for every node. */
export async function publishColumnarStore(storage: LocalStorage, fileId: number) {
  const keys = columnarKeysOf(storage, fileId)
  await storage.mirror.publishWithDigest(keys.store)
  await storage.mirror.publishWithDigest(keys.index)
}

/**
 * The path of a local copy of a deposited original, for a job thread to read. An original that is
 * on this node's disk but not in the bucket (received here before uploads went to the bucket) is
 * read where it is.
 */
export async function localOriginalOf(storage: LocalStorage, storageKey: string) {
  const key = storage.originalKey(storageKey)
  try {
    return await storage.mirror.localCopy(key)
  } catch (error) {
    const here = storage.mirror.pathOf(key)
    if (error instanceof ObjectNotFoundError && existsSync(here)) return here
    throw error
  }
}
