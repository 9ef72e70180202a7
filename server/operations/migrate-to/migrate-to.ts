import { existsSync } from 'node:fs'
import { join } from 'node:path'
import { Client } from 'pg'
import { openDatabase } from '../../db'
import { migrationsList } from '../../migrations'
import { LocalObjectStore } from '../../storage/local-object-store'
import { createObjectStore, describeStorage, storageProblem } from '../../storage/object-storage'
import type { StorageConfig } from '../../storage/storage-config'
import { databaseProblem, describeDatabase } from '../../startup/dependencies'
import { copyObjects, storeHoldsObjects, type FileCopyResult } from './file-copy'
import {
  checkSourceSchema,
  compareCounts,
  copyRecords,
  MigrationRefused,
  occupiedTables,
  openSource,
  planTables,
  splitBySource,
  type TableResult,
} from './record-copy'

export { MigrationRefused } from './record-copy'

export interface MigrateToOptions {
  /** The embedded installation: its data directory (SQLite file and bytes). */
  dataDir: string
  /** The target PostgreSQL database (postgres://…); created empty by the operator. */
  databaseUrl: string
  /** The target object store (the S3 profile's settings). */
  storage: StorageConfig
  /** Continue an interrupted copy into a target that already holds part of it. */
  resume: boolean
  /** One line of the report. */
  out: (line: string) => void
}

export interface MigrateToReport {
  tables: TableResult[]
  recordsAlreadyThere: boolean
  files: FileCopyResult
}

/**
 * Moves an embedded installation to the cluster profile: the schema, every record (one
 * transaction), then every stored and derived file (verified by SHA-256). The source is only
 * read. A run that stops half-way leaves either no records or all of them, and whole objects
 * only; `resume` then finishes it.
 */
export async function migrateTo(options: MigrateToOptions): Promise<MigrateToReport> {
  const { out } = options
  const sqlite = join(options.dataDir, 'stipple.sqlite')
  if (!existsSync(sqlite))
    throw new MigrationRefused(
      `No embedded database at ${sqlite}: set DATA_DIR to the data directory of the installation to move.`,
    )
  if (options.storage.kind !== 's3')
    throw new MigrationRefused('The target storage must be an s3:// URL (an S3-compatible bucket).')
  const whereDb = describeDatabase(options.databaseUrl)
  const whereStore = describeStorage(options.storage, options.dataDir)
  out(`Moving the embedded installation in ${options.dataDir}`)
  out(`  to ${whereDb}`)
  out(`  and ${whereStore}`)

  const source = openSource(sqlite)
  const from = new LocalObjectStore(options.dataDir)
  const to = createObjectStore(options.storage, options.dataDir)
  const pg = new Client({ connectionString: options.databaseUrl })
  try {
    checkSourceSchema(
      source,
      migrationsList.map((m) => m.name),
    )
    await to.ping().catch((err: unknown) => {
      throw new MigrationRefused(
        `The object store ${whereStore} is not usable: ${storageProblem(err)}.`,
      )
    })
    await pg.connect().catch((err: unknown) => {
      throw new MigrationRefused(`The database ${whereDb} is not usable: ${databaseProblem(err)}.`)
    })

    out('Bringing the target database to the current schema…')
    const orm = await openDatabase({ driver: 'postgresql', url: options.databaseUrl })
    await orm.close()

    const { shared: plan, clusterOnly } = splitBySource(source, await planTables(pg))
    if (clusterOnly.length)
      out(`Tables of the cluster profile only, nothing to copy: ${clusterOnly.join(', ')}`)
    const occupied = await occupiedTables(pg, plan)
    const objectsThere = await storeHoldsObjects(to)
    if (!options.resume && (occupied.length || objectsThere)) {
      const what = [
        ...occupied.map((o) => `${o.rows} row(s) in ${o.table}`),
        ...(objectsThere ? ['objects under files/, derived/ or version-blobs/ in the bucket'] : []),
      ]
      throw new MigrationRefused(
        `The target already holds data (${what.slice(0, 4).join('; ')}${what.length > 4 ? '; …' : ''}). ` +
          'Point at an empty database and bucket, or add --resume to finish a copy that was interrupted.',
      )
    }

    let tables: TableResult[]
    const recordsAlreadyThere = occupied.length > 0
    if (recordsAlreadyThere) {
      tables = await compareCounts(source, pg, plan)
      const differ = tables.filter((t) => !t.leftBehind && t.source !== t.target)
      if (differ.length)
        throw new MigrationRefused(
          `The target database holds other records than this installation (${differ
            .map((t) => `${t.table}: ${t.target} here, ${t.source} in the source`)
            .join('; ')}); nothing was changed.`,
        )
      out('Records: already copied by the interrupted run (row counts match).')
    } else {
      out(`Copying the records of ${plan.length} tables in one transaction…`)
      tables = await copyRecords(source, pg, plan, () => undefined)
    }

    const recorded = new Map<string, string>()
    for (const row of source
      .prepare('select storage_key, sha256 from dataset_file where sha256 is not null')
      .all() as { storage_key: string; sha256: string }[])
      recorded.set(`files/${row.storage_key}`, row.sha256)
    out('Copying files, checking each one’s SHA-256…')
    let lastShown = 0
    const files = await copyObjects(from, to, {
      resume: options.resume,
      recordedSha256: (key) =>
        recorded.get(key) ?? /^version-blobs\/([0-9a-f]{64})$/.exec(key)?.[1],
      progress: (done, total) => {
        if (done === total || done - lastShown >= 100) {
          lastShown = done
          out(`  ${done} of ${total} files`)
        }
      },
    })
    printSummary({ tables, recordsAlreadyThere, files }, options)
    return { tables, recordsAlreadyThere, files }
  } finally {
    source.close()
    to.close?.()
    await pg.end().catch(() => undefined)
  }
}

const mib = (bytes: number) => `${(bytes / 1024 ** 2).toFixed(1)} MiB`

function printSummary(report: MigrateToReport, options: MigrateToOptions) {
  const { out } = options
  const width = Math.max(...report.tables.map((t) => t.table.length))
  out('')
  out('Records (source → target):')
  for (const t of report.tables) {
    const counts = `${String(t.source).padStart(8)} → ${t.leftBehind ? '       –' : String(t.target).padStart(8)}`
    const verdict = t.leftBehind
      ? 'left behind: unfinished uploads start again on the new profile'
      : t.source === t.target
        ? 'ok'
        : 'DIFFERENT'
    out(`  ${t.table.padEnd(width)} ${counts}  ${verdict}`)
  }
  const f = report.files
  out('')
  out('Files:')
  out(`  copied and verified  ${f.copied} (${mib(f.bytes)})`)
  if (f.alreadyThere) out(`  already there        ${f.alreadyThere} (same size and SHA-256)`)
  if (f.skippedTiles)
    out(`  preview tiles        ${f.skippedTiles} not copied (a cache; redrawn on demand)`)
  for (const failure of f.failures) out(`  FAILED ${failure.key}: ${failure.problem}`)
  out('')
  if (f.failures.length) {
    out(
      `${f.failures.length} file(s) did not copy. Nothing in the source changed; fix the cause and run again with --resume.`,
    )
    return
  }
  out('Done. To run on the cluster profile, give every node:')
  out('  DATABASE_URL and STORAGE_URL as given here (with the same S3_* settings),')
  out(
    `  SESSION_SECRET = "sessionSecret" of ${join(options.dataDir, 'secrets.json')} (keeps people signed in).`,
  )
  out('The source is unchanged; keep it until the new installation has been checked.')
}
