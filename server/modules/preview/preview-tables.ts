import type { DatasetState } from '@shared/domain/dataset-state'
import type { FileKind, FileStatus } from '@shared/domain/files'
import type { ReadConnection } from '../common/read-connection'
import type { DatasetFacts } from '../datasets/dataset-access'
import type { IDatasetFile } from '../files/dataset-file.entity'

/** A table as the preview needs it; its validation report is read only when it is needed. */
export interface PreviewTable extends Pick<IDatasetFile, 'id' | 'kind' | 'status' | 'name'> {
  report(): Promise<Record<string, unknown> | null>
}

/** The preview's view of a file entity already loaded. */
export const previewTableOf = (file: IDatasetFile): PreviewTable => ({
  id: file.id,
  kind: file.kind,
  status: file.status,
  name: file.name,
  report: () => Promise.resolve(file.report ?? null),
})

interface TargetRow {
  id: number
  accession: string
  project: number
  state: DatasetState
  /** Epoch milliseconds on SQLite (how the ORM stores dates there), a Date on PostgreSQL. */
  embargoUntil: number | Date | null
  fileId: number | null
  kind: FileKind | null
  status: FileStatus | null
  name: string | null
}

// Quoted aliases keep their case on PostgreSQL too (unquoted ones are folded to lower case).
const TARGET = `select d.id, d.accession, d.project_id as project, d.state,
  d.embargo_until as "embargoUntil", f.id as "fileId", f.kind, f.status, f.name
  from dataset d left join dataset_file f on f.dataset_id = d.id and f.id = ?`
const BY_ID = `${TARGET} where d.id = ?`
const BY_ACCESSION = `${TARGET} where d.accession = ?`
const REPORT = 'select report from dataset_file where id = ?'

/**
 * Finds a dataset and one of its tables for the preview routes, in one prepared statement: every
 * tile asks, hundreds of times a second while someone pans (see ReadConnection).
 */
export class PreviewTables {
  constructor(private readonly db: ReadConnection) {}

  /** The dataset (null when there is none) and its table (null when the dataset lacks it). */
  async find(
    idOrAccession: string,
    fileId: number,
  ): Promise<{ dataset: DatasetFacts | null; table: PreviewTable | null }> {
    const row = /^\d+$/.test(idOrAccession)
      ? await this.db.get<TargetRow>(BY_ID, fileId, Number(idOrAccession))
      : await this.db.get<TargetRow>(BY_ACCESSION, fileId, idOrAccession.toUpperCase())
    if (!row) return { dataset: null, table: null }
    const dataset: DatasetFacts = {
      id: row.id,
      accession: row.accession,
      project: row.project,
      state: row.state,
      embargoUntil: row.embargoUntil === null ? null : new Date(row.embargoUntil),
    }
    if (row.fileId === null) return { dataset, table: null }
    const table: PreviewTable = {
      id: row.fileId,
      kind: row.kind!,
      status: row.status!,
      name: row.name!,
      report: async () => {
        // JSON text on SQLite; already parsed from jsonb on PostgreSQL.
        const stored = await this.db.get<{ report: string | Record<string, unknown> | null }>(
          REPORT,
          row.fileId,
        )
        const report = stored?.report ?? null
        return typeof report === 'string' ? (JSON.parse(report) as Record<string, unknown>) : report
      },
    }
    return { dataset, table }
  }
}
