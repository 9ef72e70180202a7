/**
 * Several processes write one SQLite file in the multi-process mode (the primary's jobs, the HTTP
 * workers' requests). A transaction that reads before it writes must wait for another writer,
 * not fail: begun deferred, its read fixes a snapshot, and when another connection commits before
 * its first write, SQLite answers SQLITE_BUSY_SNAPSHOT ("database is locked") at once, without
 * the busy timeout (sqlite.org/isolation.html). Begun IMMEDIATE, the writers queue at BEGIN.
 */
import { execFile } from 'node:child_process'
import { mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { promisify } from 'node:util'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { openDatabase, type Orm } from '@server/db'
import { Organization } from '@server/modules/organizations/organization.entity'

const run = promisify(execFile)
const dir = mkdtempSync(join(tmpdir(), 'stipple-sqlite-writers-'))
const file = join(dir, 'stipple.db')
let orm: Orm

beforeAll(async () => {
  orm = await openDatabase(file)
})
afterAll(async () => {
  await orm?.close()
  rmSync(dir, { recursive: true, force: true })
})

const pause = (ms: number) => new Promise((r) => setTimeout(r, ms))

/**
 * Another process writes a row, waiting for the write lock as the server's connections do
 * (better-sqlite3 waits synchronously, which is why it must be another process).
 */
const writeFromAnotherProcess = (name: string) =>
  run(process.execPath, [
    '-e',
    `const db = new (require('better-sqlite3'))(${JSON.stringify(file)});
     db.pragma('busy_timeout = 5000');
     db.prepare('insert into organization (name, kind, created_at) values (?, ?, ?)').run(${JSON.stringify(name)}, 'lab', Date.now());`,
  ])

describe('write transactions on a SQLite file that another process writes too', () => {
  it('wait for each other instead of failing when one commits between the other’s read and write', async () => {
    let other: Promise<unknown> = Promise.resolve()
    const reading = orm.em.fork().transactional(async (em) => {
      await em.count(Organization, {})
      other = writeFromAnotherProcess('Written by another process')
      await pause(1500) // long enough for the other process to start and try its write
      em.create(Organization, { name: 'Read, then written' })
    })
    await expect(reading).resolves.toBeUndefined()
    await other
    const names = (await orm.em.fork().find(Organization, {})).map((o) => o.name)
    expect(names).toEqual(
      expect.arrayContaining(['Read, then written', 'Written by another process']),
    )
  })
})
