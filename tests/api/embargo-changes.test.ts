/**
 * Stewards extend, shorten or lift an embargo with a reason; the audit event keeps the end before
 * and after; an end in the past or beyond the configured maximum is a clear 400 problem.
 */
import request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { AuditEvent } from '@server/modules/audit/audit-event.entity'
import { embargoEnd } from '@server/modules/datasets/dataset-lifecycle.service'
import {
  bearer,
  buildDataset,
  buildMember,
  buildProject,
  buildUser,
  tokenFor,
} from '../fixtures/builders'
import { createTestApp, type TestApp } from '../fixtures/test-app'

let t: TestApp
let stewardToken: string
const inDays = (n: number) => new Date(Date.now() + n * 86_400_000).toISOString().slice(0, 10)

beforeAll(async () => {
  t = await createTestApp({ EMBARGO_MAX_YEARS: '2' })
  stewardToken = await tokenFor(t.em(), await buildUser(t.em(), { siteRole: 'steward' }))
})
afterAll(() => t.close())

async function embargoed(days: number) {
  const project = await buildProject(t.em(), [])
  return buildDataset(t.em(), project.id, {
    state: 'approved',
    embargoUntil: new Date(`${inDays(days)}T00:00:00Z`),
  })
}
const put = (id: number, body: object) =>
  request(t.app).put(`/api/datasets/${id}/embargo`).set(bearer(stewardToken)).send(body)

describe('changing an embargo', () => {
  it('shortens and extends with a reason, each audited with the end before and after', async () => {
    const d = await embargoed(200)
    expect((await put(d.id, { until: inDays(100), reason: 'Paper out early' })).status).toBe(200)
    expect((await put(d.id, { until: inDays(300), reason: 'Second paper' })).status).toBe(200)
    const events = await t
      .em()
      .find(
        AuditEvent,
        { action: 'dataset.embargo', targetId: d.accession },
        { orderBy: { id: 'asc' } },
      )
    expect(events.map((e) => e.details)).toEqual([
      {
        reason: 'Paper out early',
        from: `${inDays(200)}T00:00:00.000Z`,
        to: `${inDays(100)}T00:00:00.000Z`,
      },
      {
        reason: 'Second paper',
        from: `${inDays(100)}T00:00:00.000Z`,
        to: `${inDays(300)}T00:00:00.000Z`,
      },
    ])
  })

  it('lifting a running embargo releases the dataset now: one release entry and the notice mail', async () => {
    const owner = await buildMember(t.em())
    const project = await buildProject(t.em(), [{ user: owner, role: 'owner' }])
    const d = await buildDataset(t.em(), project.id, {
      state: 'approved',
      embargoUntil: new Date(`${inDays(90)}T00:00:00Z`),
    })
    const res = await put(d.id, { until: null, reason: 'Paper published early' })
    expect(res.status).toBe(200)
    expect(res.body.embargoUntil).toBeNull()
    const released = await t
      .em()
      .find(AuditEvent, { action: 'dataset.release', targetId: d.accession })
    expect(released.map((e) => e.details)).toEqual([
      {
        scheduledFor: `${inDays(90)}T00:00:00.000Z`,
        lifted: true,
        reason: 'Paper published early',
      },
    ])
    const until = Date.now() + 3000
    let mail = t.mail.messages.filter((m) => m.to.includes(owner.email))
    while (!mail.length && Date.now() < until) {
      await new Promise((r) => setTimeout(r, 20))
      mail = t.mail.messages.filter((m) => m.to.includes(owner.email))
    }
    expect(mail.map((m) => m.subject)).toEqual([
      `${d.accession} is now public: its embargo was lifted`,
    ])
    // The public reads its files now; a released dataset has no embargo left to change.
    expect((await request(t.app).get(`/api/datasets/${d.accession}/files`)).status).toBe(200)
    expect((await put(d.id, { until: null, reason: 'Again' })).status).toBe(403)
    expect(
      await t.em().count(AuditEvent, { action: 'dataset.release', targetId: d.accession }),
    ).toBe(1)
  })

  it('refuses a past end, an end beyond the maximum and an empty reason with 400 problems naming the field', async () => {
    const d = await embargoed(30)
    for (const [body, pointer, words] of [
      [{ until: inDays(-1), reason: 'x' }, '#/until', /future/],
      [{ until: inDays(0), reason: 'x' }, '#/until', /future/],
      [{ until: inDays(3 * 365), reason: 'x' }, '#/until', /at most 2 years/],
      [{ until: inDays(60), reason: '' }, '#/reason', /./],
    ] as const) {
      const res = await put(d.id, body)
      expect(res.status).toBe(400)
      expect(res.headers['content-type']).toContain('application/problem+json')
      const error = res.body.errors.find((e: { pointer: string }) => e.pointer === pointer)
      expect(error.detail).toMatch(words)
    }
    expect(
      await t.em().count(AuditEvent, { action: 'dataset.embargo', targetId: d.accession }),
    ).toBe(0)
  })
})

describe('the policy bounds, with an injected clock', () => {
  const now = new Date('2030-02-28T15:00:00Z')
  it('accepts the day after today up to exactly the maximum length, nothing outside', () => {
    expect(embargoEnd('2030-03-01', '#/until', now, 3)?.toISOString()).toBe(
      '2030-03-01T00:00:00.000Z',
    )
    expect(() => embargoEnd('2030-02-28', '#/until', now, 3)).toThrow(/400|Invalid|fields/)
    expect(embargoEnd('2033-02-28', '#/until', now, 3)?.toISOString()).toBe(
      '2033-02-28T00:00:00.000Z',
    )
    expect(() => embargoEnd('2033-03-01', '#/until', now, 3)).toThrow()
    expect(embargoEnd(null, '#/until', now, 3)).toBeNull()
  })
})
