import Database from 'better-sqlite3'
import type { Client } from 'pg'

/**
 * Copies every record of an embedded installation's SQLite file into an empty PostgreSQL database
 * that already has the current schema. Tables, columns, their types and the foreign keys are read
 * from PostgreSQL itself, so a table added later is copied without touching this module.
 */

/** Tables made by migrations, not copied: the migration log, and the full-text index (its triggers refill it). */
const NOT_COPIED = new Set(['mikro_orm_migrations', 'dataset_search'])
/**
 * Records of unfinished uploads: their bytes stay in the old data directory (tus keeps them there
 * half-written), so the clients start those uploads again, and the quota they held is freed.
 */
const LEFT_BEHIND = new Set(['upload_reservation'])
/** Named counters: the target's migrations and triggers already wrote some; the larger value wins. */
const COUNTERS = 'sequence'
/** Rows per INSERT, within PostgreSQL's 65 535 parameters a statement. */
const MAX_PARAMETERS = 60_000
const MAX_ROWS = 500

interface Column {
  name: string
  /** PostgreSQL's data_type (information_schema), which decides how a SQLite value is sent. */
  type: string
  /** A serial or identity column, whose sequence must move past the copied ids. */
  generated: boolean
}

export interface TablePlan {
  name: string
  columns: Column[]
}

export interface TableResult {
  table: string
  source: number
  target: number
  /** Not copied on purpose (see LEFT_BEHIND). */
  leftBehind?: boolean
}

export class MigrationRefused extends Error {}

const q = (name: string) => `"${name.replace(/"/g, '""')}"`

/** The tables to copy, parents before children, from the target's own catalogue. */
export async function planTables(pg: Client): Promise<TablePlan[]> {
  const { rows: columns } = await pg.query<{
    table_name: string
    column_name: string
    data_type: string
    generated: boolean
  }>(
    `select table_name, column_name, data_type,
            (column_default like 'nextval(%' or is_identity = 'YES') as generated
       from information_schema.columns
      where table_schema = current_schema()
        and table_name in (select table_name from information_schema.tables
                            where table_schema = current_schema() and table_type = 'BASE TABLE')
      order by table_name, ordinal_position`,
  )
  const tables = new Map<string, Column[]>()
  for (const c of columns) {
    if (NOT_COPIED.has(c.table_name)) continue
    const list = tables.get(c.table_name) ?? []
    list.push({ name: c.column_name, type: c.data_type, generated: Boolean(c.generated) })
    tables.set(c.table_name, list)
  }
  const { rows: edges } = await pg.query<{ child: string; parent: string }>(
    `select c.conrelid::regclass::text as child, c.confrelid::regclass::text as parent
       from pg_constraint c
      where c.contype = 'f' and c.connamespace = current_schema()::regnamespace`,
  )
  const parents = new Map<string, Set<string>>()
  for (const e of edges) {
    const child = unquote(e.child)
    const parent = unquote(e.parent)
    if (child === parent) continue // self-references: rows go in id order, parents first
    parents.set(child, (parents.get(child) ?? new Set()).add(parent))
  }
  const ordered: string[] = []
  const state = new Map<string, 'visiting' | 'done'>()
  const visit = (table: string, path: string[]) => {
    if (state.get(table) === 'done') return
    if (state.get(table) === 'visiting')
      throw new Error(`The schema's foreign keys form a cycle: ${[...path, table].join(' → ')}`)
    state.set(table, 'visiting')
    for (const parent of [...(parents.get(table) ?? [])].sort())
      if (tables.has(parent)) visit(parent, [...path, table])
    state.set(table, 'done')
    ordered.push(table)
  }
  for (const table of [...tables.keys()].sort()) visit(table, [])
  return ordered.map((name) => ({ name, columns: tables.get(name)! }))
}

const unquote = (name: string) => name.replace(/^"|"$/g, '').replace(/""/g, '"')

/** The embedded database, opened read-only: the copy never writes to its source. */
export function openSource(path: string): Database.Database {
  return new Database(path, { readonly: true, fileMustExist: true })
}

/**
 * Refuses a source whose schema is older (or newer) than this release's: its rows would not fit
 * the target's tables. Starting Stipple once on the old data directory brings it up to date.
 */
export function checkSourceSchema(source: Database.Database, expected: string[]): void {
  const applied = new Set(
    (source.prepare('select name from mikro_orm_migrations').all() as { name: string }[]).map((r) =>
      r.name.replace(/\.[jt]s$/, ''),
    ),
  )
  const missing = expected.filter((name) => !applied.has(name))
  const unknown = [...applied].filter((name) => !expected.includes(name))
  if (missing.length)
    throw new MigrationRefused(
      `The embedded database is ${missing.length} migration(s) behind this release (first missing: ${missing[0]}). ` +
        'Start Stipple once on that data directory (or run `npm run db:migrate`) so it is up to date, then copy.',
    )
  if (unknown.length)
    throw new MigrationRefused(
      `The embedded database has migrations this release does not know (${unknown.join(', ')}): copy it with the release that wrote them.`,
    )
}

/**
 * Splits the plan into the tables the source has and those only the cluster profile has (its
 * coordination and queue tables): those start empty and are not copied.
 */
export function splitBySource(
  source: Database.Database,
  plan: TablePlan[],
): { shared: TablePlan[]; clusterOnly: string[] } {
  const present = new Set(
    (
      source.prepare("select name from sqlite_master where type = 'table'").all() as {
        name: string
      }[]
    ).map((r) => r.name),
  )
  return {
    shared: plan.filter((t) => present.has(t.name)),
    clusterOnly: plan.filter((t) => !present.has(t.name)).map((t) => t.name),
  }
}

export function sourceCount(source: Database.Database, table: string): number {
  return (source.prepare(`select count(*) as n from ${q(table)}`).get() as { n: number }).n
}

async function targetCount(pg: Client, table: string): Promise<number> {
  const { rows } = await pg.query<{ n: string }>(`select count(*) as n from ${q(table)}`)
  return Number(rows[0]!.n)
}

/**
 * Tables of the target that already hold rows the copy would write (counters excepted: the
 * target's migrations write one). An empty list means the target is fresh.
 */
export async function occupiedTables(
  pg: Client,
  plan: TablePlan[],
): Promise<{ table: string; rows: number }[]> {
  const occupied: { table: string; rows: number }[] = []
  for (const { name } of plan) {
    if (name === COUNTERS || LEFT_BEHIND.has(name)) continue
    const rows = await targetCount(pg, name)
    if (rows) occupied.push({ table: name, rows })
  }
  return occupied
}

/**
 * A SQLite value as PostgreSQL expects it for the column's type. MikroORM keeps dates in SQLite as
 * epoch milliseconds and booleans as 0/1; JSON is text in both and is sent as it was written.
 */
function convert(value: unknown, type: string): unknown {
  if (value === null || value === undefined) return null
  if (type.startsWith('timestamp') && typeof value === 'number')
    return new Date(value).toISOString()
  if (type === 'date' && typeof value === 'number')
    return new Date(value).toISOString().slice(0, 10)
  if (type === 'boolean' && typeof value === 'number') return value !== 0
  if ((type === 'json' || type === 'jsonb') && typeof value !== 'string')
    return JSON.stringify(value)
  return value
}

/**
 * Copies the rows of every planned table in one transaction of the target: either every record
 * arrives, or none does and the copy can simply run again. The audit trail's triggers refuse
 * updates, deletes and truncation only, so its rows are inserted with the triggers in place; the
 * access-version and full-text triggers fire as for any insert (the index fills itself). Ids are
 * kept, and each table's id sequence is moved past the largest copied id afterwards. Row counts
 * are compared before the commit.
 */
export async function copyRecords(
  source: Database.Database,
  pg: Client,
  plan: TablePlan[],
  progress: (table: string, rows: number) => void,
): Promise<TableResult[]> {
  const results: TableResult[] = []
  // One read transaction on the source: every table is read from the same moment.
  source.exec('begin')
  await pg.query('begin')
  try {
    for (const table of plan) {
      const expected = sourceCount(source, table.name)
      if (LEFT_BEHIND.has(table.name)) {
        results.push({ table: table.name, source: expected, target: 0, leftBehind: true })
        continue
      }
      const sourceColumns = new Set(
        (source.prepare(`pragma table_info(${q(table.name)})`).all() as { name: string }[]).map(
          (c) => c.name,
        ),
      )
      const absent = table.columns.filter((c) => !sourceColumns.has(c.name)).map((c) => c.name)
      if (!sourceColumns.size || absent.length)
        throw new MigrationRefused(
          `The embedded database's table "${table.name}" does not match the target schema` +
            (absent.length ? ` (no column ${absent.join(', ')})` : ' (no such table)'),
        )
      const names = table.columns.map((c) => q(c.name)).join(', ')
      const key = table.columns.some((c) => c.name === 'id') ? ' order by "id"' : ''
      const rows = source
        .prepare(`select ${names} from ${q(table.name)}${key}`)
        .raw()
        .iterate() as IterableIterator<unknown[]>
      const perBatch = Math.max(
        1,
        Math.min(MAX_ROWS, Math.floor(MAX_PARAMETERS / table.columns.length)),
      )
      let batch: unknown[][] = []
      let copied = 0
      const flush = async () => {
        if (!batch.length) return
        await insertRows(pg, table, batch)
        copied += batch.length
        progress(table.name, copied)
        batch = []
      }
      for (const row of rows) {
        batch.push(row.map((v, i) => convert(v, table.columns[i]!.type)))
        if (batch.length >= perBatch) await flush()
      }
      await flush()
      await resetSequences(pg, table)
      const target = await targetCount(pg, table.name)
      if (target !== expected)
        throw new Error(
          `Table "${table.name}": ${expected} rows in the source but ${target} in the target after the copy`,
        )
      results.push({ table: table.name, source: expected, target })
    }
    await pg.query('commit')
  } catch (err) {
    await pg.query('rollback').catch(() => undefined)
    throw err
  } finally {
    source.exec('commit')
  }
  return results
}

async function insertRows(pg: Client, table: TablePlan, rows: unknown[][]): Promise<void> {
  const width = table.columns.length
  const values = rows
    .map((_, r) => `(${table.columns.map((_, c) => `$${r * width + c + 1}`).join(', ')})`)
    .join(', ')
  const names = table.columns.map((c) => q(c.name)).join(', ')
  const conflict =
    table.name === COUNTERS
      ? ` on conflict ("name") do update set "value" = greatest(${q(table.name)}."value", excluded."value")`
      : ''
  await pg.query(`insert into ${q(table.name)} (${names}) values ${values}${conflict}`, rows.flat())
}

async function resetSequences(pg: Client, table: TablePlan): Promise<void> {
  for (const column of table.columns.filter((c) => c.generated)) {
    // is_called = false: the next id handed out is max + 1 (or 1 in an empty table).
    await pg.query(
      `select setval(pg_get_serial_sequence($1, $2), coalesce((select max(${q(column.name)}) from ${q(table.name)}), 0) + 1, false)`,
      [q(table.name), column.name],
    )
  }
}

/**
 * On a resumed copy whose records already arrived: every table's count must equal the source's,
 * or the target holds something else and is not touched.
 */
export async function compareCounts(
  source: Database.Database,
  pg: Client,
  plan: TablePlan[],
): Promise<TableResult[]> {
  const results: TableResult[] = []
  for (const table of plan) {
    const expected = sourceCount(source, table.name)
    if (LEFT_BEHIND.has(table.name)) {
      results.push({ table: table.name, source: expected, target: 0, leftBehind: true })
      continue
    }
    results.push({ table: table.name, source: expected, target: await targetCount(pg, table.name) })
  }
  return results
}
