import type { LocalStorage } from '../../storage/local-storage'
import type { IDatasetFile } from './dataset-file.entity'

/** The job kinds of file processing; the work runs in worker threads (file-processing.work.ts). */
export const FILE_JOBS = {
  inspectTable: 'inspect-table',
  ingestTable: 'ingest-table',
  scanRawStack: 'scan-raw-stack',
} as const

/** Where a file's derived outputs go. */
export function derivedPaths(storage: LocalStorage, fileId: number) {
  return {
    columnar: storage.derivedPath(fileId, 'localizations.arrow'),
    thumbnail: storage.derivedPath(fileId, 'projection.png'),
    trace: storage.derivedPath(fileId, 'frame-means.json'),
  }
}

/** The first job a newly registered file needs, if any. */
export function firstJobFor(
  file: IDatasetFile,
  storage: LocalStorage,
): { kind: string; payload: Record<string, unknown> } | null {
  const source = storage.originalPath(file.storageKey)
  if (file.kind === 'localization_table') {
    return {
      kind: FILE_JOBS.inspectTable,
      payload: { fileId: file.id, source, output: derivedPaths(storage, file.id).columnar },
    }
  }
  if (file.kind === 'raw_stack') {
    const out = derivedPaths(storage, file.id)
    return {
      kind: FILE_JOBS.scanRawStack,
      payload: { fileId: file.id, source, thumbnail: out.thumbnail, trace: out.trace },
    }
  }
  return null
}
