/**
 * The audit trail: nothing on the API changes or removes an event, and the table itself refuses;
 * stewards filter it by dataset, actor, action and time and read names, accessions and words;
 * the CSV export holds the filtered view; an editing session's autosaves are one edit.
 */
import { parse } from 'csv-parse/sync'
import request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { AuditEvent } from '@server/modules/audit/audit-event.entity'
import { Dataset } from '@server/modules/datasets/dataset.entity'
import { DatasetVersion } from '@server/modules/versions/dataset-version.entity'
import { audit, EDIT_SESSION_WINDOW_MS } from '@server/modules/audit/audit.service'
import { saveMetadata } from '@server/modules/metadata/metadata.service'
import type { IUser } from '@server/modules/users/user.entity'
import { AUDIT_ACTIONS, AUDIT_ACTION_LABELS } from '@shared/domain/audit-actions'
import type { AuditEventDto } from '@shared/schemas/audit.schema'
import { metadataSchema, type DatasetMetadata } from '@shared/metadata/metadata.schema'
import {
  bearer,
  buildDataset,
  buildMember,
  buildProject,
  buildUser,
  tokenFor,
} from '../fixtures/builders'
import { completeMetadata } from '../fixtures/metadata'
import { buildJournal, buildManuscript } from '../fixtures/review-builders'
import { createTestApp, type TestApp } from '../fixtures/test-app'

let t: TestApp
let steward: IUser
let stewardToken: string
let depositor: IUser
let depositorToken: string
let accession: string

beforeAll(async () => {
  t = await createTestApp()
  const em = t.em()
  steward = await buildUser(em, { siteRole: 'steward', name: 'Rosalind Steward' })
  depositor = await buildMember(em)
  depositor.name = 'Ada Depositor_100%'
  await em.flush()
  stewardToken = await tokenFor(em, steward)
  depositorToken = await tokenFor(em, depositor)
  const project = await buildProject(em, [{ user: depositor, role: 'owner' }])
  const dataset = await buildDataset(em, project.id, {
    state: 'approved',
    embargoUntil: new Date(Date.now() + 90 * 86_400_000),
  })
  accession = dataset.accession
  // Events at known times, by known people.
  const at = (iso: string) => new Date(iso)
  audit(
    em,
    { user: depositor },
    {
      action: 'dataset.submit',
      targetType: 'Dataset',
      targetId: accession,
      at: at('2026-03-01T10:00:00Z'),
    },
  )
  audit(
    em,
    { user: steward },
    {
      action: 'dataset.embargo',
      targetType: 'Dataset',
      targetId: accession,
      details: {
        reason: 'Paper delayed, "major revision"',
        from: '2026-06-01T00:00:00.000Z',
        to: '2026-09-01T00:00:00.000Z',
      },
      at: at('2026-03-05T12:00:00Z'),
    },
  )
  audit(em, null, {
    action: 'dataset.release',
    targetType: 'Dataset',
    targetId: accession,
    details: { scheduledFor: '2026-09-01T00:00:00.000Z' },
    at: at('2026-09-01T00:00:30Z'),
  })
  audit(
    em,
    { user: steward },
    {
      action: 'dataset.embargo',
      targetType: 'Dataset',
      targetId: 'STPL-999999',
      details: { reason: '=HYPERLINK("http://evil.test")', from: null, to: null },
      at: at('2026-04-01T12:00:00Z'),
    },
  )
  const prankster = await buildUser(em, { name: '=2+3' })
  audit(
    em,
    { user: prankster },
    {
      action: 'dataset.embargo',
      targetType: 'Dataset',
      targetId: 'STPL-999998',
      details: { reason: 'x', from: null, to: null },
      at: at('2026-01-01T00:00:00Z'),
    },
  )
  await em.flush()
})
afterAll(() => t.close())

const log = (query: Record<string, string>) =>
  request(t.app).get('/api/audit').query(query).set(bearer(stewardToken))

describe('the audit trail is append-only', () => {
  it('has no route that changes or deletes an event', async () => {
    const before = await t.em().find(AuditEvent, {}, { orderBy: { id: 'asc' } })
    const id = before[0]!.id
    for (const path of ['/api/audit', `/api/audit/${id}`, '/api/audit/export.csv'])
      for (const method of ['patch', 'put', 'delete', 'post'] as const) {
        const res = await request(t.app)[method](path).set(bearer(stewardToken)).send({
          action: 'user.sign_in',
          details: null,
        })
        expect([404, 405]).toContain(res.status)
      }
    const after = await t.em().find(AuditEvent, {}, { orderBy: { id: 'asc' } })
    expect(after.map((e) => [e.id, e.action, e.details])).toEqual(
      before.map((e) => [e.id, e.action, e.details]),
    )
  })

  it('is refused by the ORM and by the database when code tries to change or remove a row', async () => {
    const em = t.em()
    const event = await em.findOneOrFail(AuditEvent, {
      targetId: accession,
      action: 'dataset.submit',
    })
    event.action = 'dataset.approve'
    await expect(em.flush()).rejects.toThrow(/append-only/)

    const em2 = t.em()
    await expect(
      em2.nativeUpdate(AuditEvent, { id: event.id }, { action: 'dataset.approve' }),
    ).rejects.toThrow(/append-only/)
    await expect(em2.nativeDelete(AuditEvent, { id: event.id })).rejects.toThrow(/append-only/)
    await expect(em2.getConnection().execute('delete from audit_event')).rejects.toThrow(
      /append-only/,
    )
    expect((await t.em().findOneOrFail(AuditEvent, { id: event.id })).action).toBe('dataset.submit')
  })
})

describe('stewards read and filter the log', () => {
  it('shows names, accessions and words instead of numbers and JSON', async () => {
    const res = await log({ accession })
    expect(res.status).toBe(200)
    const embargo = res.body.items.find((e: { action: string }) => e.action === 'dataset.embargo')
    expect(embargo).toMatchObject({
      actorName: 'Rosalind Steward',
      actionLabel: 'Changed the embargo',
      targetLabel: accession,
      summary:
        'reason: Paper delayed, "major revision"; from: 2026-06-01 (UTC); to: 2026-09-01 (UTC)',
    })
    const release = res.body.items.find((e: { action: string }) => e.action === 'dataset.release')
    expect(release).toMatchObject({
      actor: null,
      actorName: null,
      summary: 'embargo end: 2026-09-01 (UTC)',
    })
  })

  it('filters by dataset (accession in any case), actor, action and time range', async () => {
    const actions = async (query: Record<string, string>) =>
      ((await log(query)).body.items as { action: string; targetId: string }[]).map(
        (e) => `${e.action}@${e.targetId}`,
      )
    expect(await actions({ accession: accession.toLowerCase() })).toEqual([
      `dataset.release@${accession}`,
      `dataset.embargo@${accession}`,
      `dataset.submit@${accession}`,
    ])
    expect(await actions({ actor: 'rosalind' })).toEqual([
      'dataset.embargo@STPL-999999',
      `dataset.embargo@${accession}`,
    ])
    // Typed text is literal: "_100%" matches that name, and only that name.
    expect(await actions({ actor: '_100%' })).toEqual([`dataset.submit@${accession}`])
    expect(await actions({ actor: 'system', accession })).toEqual([`dataset.release@${accession}`])
    expect(await actions({ actor: 'nobody by this name' })).toEqual([])
    expect(await actions({ action: 'dataset.embargo', accession })).toEqual([
      `dataset.embargo@${accession}`,
    ])
    // A day as the upper bound includes that whole day; an instant is exact.
    expect(await actions({ from: '2026-03-01', to: '2026-03-05' })).toEqual([
      `dataset.embargo@${accession}`,
      `dataset.submit@${accession}`,
    ])
    expect(await actions({ from: '2026-03-01T10:00:01Z', to: '2026-04-30T00:00:00Z' })).toEqual([
      'dataset.embargo@STPL-999999',
      `dataset.embargo@${accession}`,
    ])
  })

  it('answers a bad time filter with a 400 problem and keeps the log closed to depositors', async () => {
    const bad = await log({ from: 'last tuesday' })
    expect(bad.status).toBe(400)
    expect(bad.headers['content-type']).toContain('application/problem+json')
    expect((await request(t.app).get('/api/audit').set(bearer(depositorToken))).status).toBe(403)
    expect(
      (await request(t.app).get('/api/audit/export.csv').set(bearer(depositorToken))).status,
    ).toBe(403)
    expect((await request(t.app).get('/api/audit/export.csv')).status).toBe(401)
  })

  it('exports the filtered view as CSV that a CSV parser reads back, formulas neutralised', async () => {
    const res = await request(t.app)
      .get('/api/audit/export.csv')
      .query({ action: 'dataset.embargo' })
      .set(bearer(stewardToken))
    expect(res.status).toBe(200)
    expect(res.headers['content-type']).toContain('text/csv')
    expect(res.headers['content-disposition']).toContain('attachment')
    const rows = parse(res.text, { columns: true }) as Record<string, string>[]
    expect(rows.map((r) => r.target)).toEqual(['STPL-999999', accession, 'STPL-999998'])
    expect(rows[1]).toMatchObject({
      time_utc: '2026-03-05T12:00:00.000Z',
      actor: 'Rosalind Steward',
      action: 'Changed the embargo',
      details:
        'reason: Paper delayed, "major revision"; from: 2026-06-01 (UTC); to: 2026-09-01 (UTC)',
    })
    expect(rows[0]!.details).toBe('reason: =HYPERLINK("http://evil.test"); from: none; to: none')
    // A name that a spreadsheet would run as a formula is written as text.
    expect(rows[2]!.actor).toBe("'=2+3")
    expect(rows.every((r) => Object.values(r).every((v) => !/^[=+\-@]/.test(v)))).toBe(true)
  })
})

describe('what an event was about, in words', () => {
  // A steward read "DatasetVersion STPL-000013.v1" and "Project 3" in the demo's log: type names
  // of the code and bare numbers. Each target now reads as people name it.
  it('names versions, projects, manuscripts and profiles, and links a version to its dataset', async () => {
    const em = t.em()
    const project = await buildProject(em, [], 'Pore census')
    const manuscript = await buildManuscript(em, (await buildJournal(em)).id, [])
    const dataset = await em.findOneOrFail(Dataset, { accession })
    em.create(DatasetVersion, {
      ...{ dataset: dataset.id, number: 2, label: `${accession}.v2`, title: dataset.title },
      ...{ licence: 'CC-BY-4.0', metadata: {} as DatasetMetadata, approvedAt: new Date() },
    })
    const at = new Date('2025-02-02T00:00:00Z')
    const events = [
      { action: 'doi.register', targetType: 'DatasetVersion', targetId: `${accession}.v2` },
      { action: 'project.create', targetType: 'Project', targetId: String(project.id) },
      { action: 'project.member', targetType: 'Project', targetId: '987654' },
      { action: 'instrument.create', targetType: 'InstrumentProfile', targetId: 'TIRF rig B' },
      { action: 'manuscript.create', targetType: 'Manuscript', targetId: String(manuscript.id) },
    ] as const
    for (const e of events) audit(em, { user: steward }, { ...e, at })
    await em.flush()

    const res = await log({ from: '2025-02-02', to: '2025-02-02' })
    expect(res.status).toBe(200)
    const items = res.body.items as AuditEventDto[]
    const seen = items.map((e) => ({
      targetId: e.targetId,
      label: e.targetLabel,
      dataset: e.targetDataset,
    }))
    expect(seen).toEqual(
      expect.arrayContaining([
        { targetId: `${accession}.v2`, label: `${accession}, version 2`, dataset: accession },
        { targetId: String(project.id), label: 'project “Pore census”', dataset: null },
        { targetId: '987654', label: 'a removed project', dataset: null },
        { targetId: 'TIRF rig B', label: 'instrument profile “TIRF rig B”', dataset: null },
        {
          targetId: String(manuscript.id),
          label: `manuscript ${manuscript.reference}`,
          dataset: null,
        },
      ]),
    )
    expect(seen).toHaveLength(events.length)
    // The dataset's filter finds its versions' events too (a DOI is registered per version).
    const ofDataset = ((await log({ accession })).body.items as AuditEventDto[]).map(
      (e) => e.action,
    )
    expect(ofDataset).toContain('doi.register')
    // No label is a type name of the code.
    for (const { label } of seen)
      expect(label).not.toMatch(/DatasetVersion|Project \d|InstrumentProfile/)
  })
})

describe('autosaves of one editing session', () => {
  it('records one dataset.metadata edit per session, and a new one after a pause or another editor', async () => {
    const em = t.em()
    const dataset = await buildDataset(em, (await buildProject(em, [])).id, { complete: false })
    const doc = metadataSchema.parse(completeMetadata())
    const actor = { user: depositor } as never
    const other = { user: steward } as never
    const start = Date.parse('2026-05-01T09:00:00Z')
    const save = (who: never, minutes: number) =>
      saveMetadata(t.em(), who, dataset, doc, new Date(start + minutes * 60_000))
    // Autosaves every couple of minutes for an hour: one session.
    for (let m = 0; m <= 60; m += 2) await save(actor, m)
    // Another person edits: their own session.
    await save(other, 61)
    // The first person comes back after a long pause: a new session.
    await save(actor, 61 + EDIT_SESSION_WINDOW_MS / 60_000 + 5)
    const rows = await t
      .em()
      .find(
        AuditEvent,
        { action: 'dataset.metadata', targetId: dataset.accession },
        { orderBy: { id: 'asc' } },
      )
    expect(rows.map((r) => [r.actor, r.time.toISOString()])).toEqual([
      [depositor.id, '2026-05-01T09:00:00.000Z'],
      [steward.id, '2026-05-01T10:01:00.000Z'],
      [depositor.id, '2026-05-01T10:36:00.000Z'],
    ])
  })
})

describe('typed action names', () => {
  it('lists the actions other features record, each with a label for people', () => {
    for (const action of [
      'dataset.approve',
      'dataset.request_changes',
      'dataset.release',
      'dataset.version',
      'doi.register',
      'doi.fail',
      'reviewer_link.create',
      'reviewer_link.revoke',
      'reviewer_link.use',
      'manuscript.create',
      'manuscript.attach',
      'link_check.run',
      'region.create',
      'region.update',
      'region.delete',
      'comment.create',
      'comment.update',
      'comment.resolve',
      'user.deactivate',
      'user.role',
    ])
      expect(AUDIT_ACTIONS).toContain(action)
    for (const label of Object.values(AUDIT_ACTION_LABELS)) expect(label).toMatch(/^[A-Z]/)
  })
})
