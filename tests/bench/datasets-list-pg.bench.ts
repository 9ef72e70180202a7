/**
 * `npm run bench -- datasets-list-pg`: the dataset list's mixed load (datasets-list.bench.ts) on
 * the PostgreSQL profile, beside the same load on SQLite in the same run (the machine is shared,
 * so only figures of one run compare). The same 10 000 datasets and people are seeded into a
 * throwaway PostgreSQL server (tests/fixtures/postgres.ts: loopback, durability off, which a
 * read-only load does not feel) and Stipple runs as a node of the cluster profile
 * (DATABASE_URL), one HTTP process per core unless BENCH_HTTP_WORKERS says otherwise. Each line
 * adds the database server's CPU per request to Stipple's own.
 *
 * Lines: mixed load on PostgreSQL (several processes, then one), the repeated query on
 * PostgreSQL, the mixed load on SQLite (BENCH_SQLITE=0 leaves it out), and with BENCH_LARGE=1
 * the mixed load on 100 000 datasets on PostgreSQL. BENCH_DURATION_S sets the seconds per line.
 */
import { mkdtempSync, readFileSync, rmSync } from 'node:fs'
import { availableParallelism, tmpdir } from 'node:os'
import { join } from 'node:path'
import { openDatabase } from '@server/db'
import { startPostgres } from '../fixtures/postgres'
import { cpuSeconds, withDatasets } from './bench-server'
import {
  CONNECTIONS,
  DURATION_S,
  line,
  loadServer,
  mixedLoad,
  repeatedLoad,
  type DatabaseServer,
} from './datasets-list.bench'
import { seedDatasets, type BenchPeople } from './seed-datasets'

/** The parent of a process, from /proc (Linux). */
const parentOf = (pid: number) =>
  Number(readFileSync(`/proc/${pid}/stat`, 'utf8').split(') ')[1]!.split(' ')[1])

/**
 * A PostgreSQL database with `count` bench datasets (analysed, as autovacuum would have by then)
 * for as long as `use` runs, and the data folder Stipple's files would go to.
 */
async function withPostgresDatasets<T>(
  count: number,
  use: (dir: string, people: BenchPeople, database: DatabaseServer) => Promise<T>,
): Promise<T> {
  const server = await startPostgres()
  const dataDir = mkdtempSync(join(tmpdir(), 'stipple-bench-list-pg-'))
  try {
    const url = await server.createDatabase()
    const orm = await openDatabase({ driver: 'postgresql', url })
    const people = await seedDatasets(orm.em.fork(), count)
    const connection = orm.em.getConnection()
    await connection.execute('analyze')
    // The server's processes are the children of the one that started this connection's backend.
    const [{ pid }] = await connection.execute<[{ pid: number }]>('select pg_backend_pid() as pid')
    const postmaster = parentOf(pid)
    await orm.close()
    return await use(dataDir, people, {
      env: { DATABASE_URL: url },
      cpuSeconds: () => cpuSeconds(postmaster),
    })
  } finally {
    rmSync(dataDir, { recursive: true, force: true })
    await server.stop()
  }
}

export async function benchDatasetListPostgresql(): Promise<Record<string, unknown>> {
  const workers = Number(process.env.BENCH_HTTP_WORKERS ?? availableParallelism())
  const pg = await withPostgresDatasets(10_000, async (dir, people, database) => ({
    mixed: await loadServer(dir, people, workers, mixedLoad(people), database),
    mixedOne: await loadServer(dir, people, 1, mixedLoad(people), database),
    repeated: await loadServer(dir, people, workers, repeatedLoad(people), database),
  }))
  const sqlite =
    process.env.BENCH_SQLITE === '0'
      ? null
      : await withDatasets(10_000, (dir, people) =>
          loadServer(dir, people, workers, mixedLoad(people)),
        )
  const large =
    process.env.BENCH_LARGE === '1'
      ? await withPostgresDatasets(100_000, (dir, people, database) =>
          loadServer(dir, people, workers, mixedLoad(people), database),
        )
      : null
  return {
    connections: CONNECTIONS,
    durationS: DURATION_S,
    visible10k: JSON.stringify(pg.mixed.visible),
    'pg mixed 10k': line(pg.mixed),
    'pg mixed 10k, 1 proc': line(pg.mixedOne),
    'pg repeated 10k': line(pg.repeated),
    ...(sqlite ? { 'sqlite mixed 10k': line(sqlite) } : {}),
    ...(large ? { 'pg mixed 100k': line(large), visible100k: JSON.stringify(large.visible) } : {}),
  }
}
