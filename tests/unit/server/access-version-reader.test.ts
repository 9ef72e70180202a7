/**
 * The per-request access-version read on a database file: it must see every commit, from this
 * connection's neighbours and from other processes, on the very next read (the list and identity
 * caches are exact, not time-limited), and it skips its statement while the WAL-index header
 * says nothing was committed.
 */
import { execFileSync } from 'node:child_process'
import { mkdtempSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import Database from 'better-sqlite3'
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { AccessVersionReader } from '@server/modules/common/access-version'

let dir: string
let path: string
let writer: Database.Database
let reader: AccessVersionReader

const neverAsked = () => {
  throw new Error('a database file is read through its own connection, not the ORM')
}

beforeEach(() => {
  dir = mkdtempSync(join(tmpdir(), 'stipple-access-version-'))
  path = join(dir, 'stipple.sqlite')
  writer = new Database(path)
  writer.pragma('journal_mode = WAL')
  writer.exec(`create table "sequence" ("name" text primary key, "value" integer not null);
    insert into "sequence" values ('access-version', 1), ('accession', 1)`)
  reader = new AccessVersionReader(path, neverAsked)
})

afterEach(() => {
  reader.close()
  writer.close()
  rmSync(dir, { recursive: true, force: true })
})

const raise = (db: Database.Database) =>
  db.exec(`update "sequence" set "value" = "value" + 1 where "name" = 'access-version'`)

/** The statement behind the reader, to count how often it runs. */
const statementOf = (r: AccessVersionReader) =>
  (r as unknown as { statement: Database.Statement }).statement

describe('AccessVersionReader on a database file', () => {
  it('sees a commit of another connection on the next read', () => {
    expect(reader.readNow()).toBe(1)
    raise(writer)
    expect(reader.readNow()).toBe(2)
    raise(writer)
    raise(writer)
    expect(reader.readNow()).toBe(4)
  })

  it('sees a commit made by another process on the next read', () => {
    expect(reader.readNow()).toBe(1)
    const script = `const D = require('better-sqlite3'); const db = new D(process.argv[1]);
      db.exec("update \\"sequence\\" set \\"value\\" = 41 where \\"name\\" = 'access-version'")`
    execFileSync(process.execPath, ['-e', script, path], { cwd: process.cwd() })
    expect(reader.readNow()).toBe(41)
  })

  it('sees commits across a checkpoint that restarts the WAL', () => {
    expect(reader.readNow()).toBe(1)
    raise(writer)
    writer.pragma('wal_checkpoint(TRUNCATE)')
    expect(reader.readNow()).toBe(2)
    raise(writer)
    expect(reader.readNow()).toBe(3)
  })

  it('runs its statement only after a commit, of any table', () => {
    const get = vi.spyOn(statementOf(reader), 'get')
    for (let i = 0; i < 5; i++) expect(reader.readNow()).toBe(1)
    expect(get.mock.calls.length).toBeLessThanOrEqual(1)
    const before = get.mock.calls.length
    // A commit that leaves the version alone still sends the reader to the database.
    writer.exec(`update "sequence" set "value" = "value" + 1 where "name" = 'accession'`)
    expect(reader.readNow()).toBe(1)
    expect(get.mock.calls.length).toBe(before + 1)
  })
})

describe('AccessVersionReader without a file', () => {
  it('leaves an in-memory database to the ORM (readNow has no answer)', () => {
    const memory = new AccessVersionReader(':memory:', neverAsked)
    expect(memory.readNow()).toBeNull()
    memory.close()
  })
})
