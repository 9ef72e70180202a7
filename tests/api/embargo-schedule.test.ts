/**
 * The embargo schedule with an injected clock: a dataset is released at its end and not before,
 * once; owners and stewards get one reminder inside the window and one notice on release; after
 * downtime the first pass catches up on every release it missed. Embargo ends are UTC instants, so
 * the local calendar of a zone far from UTC never moves them.
 */
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest'
import { accessPhase } from '@shared/domain/dataset-state'
import { AuditEvent } from '@server/modules/audit/audit-event.entity'
import { EmbargoNotice } from '@server/modules/embargo/embargo-notice.entity'
import { createEmbargoScheduler } from '@server/modules/embargo/embargo-scheduler'
import { createMailer } from '@server/modules/mail/mailer'
import { createLogger } from '@server/logger'
import { Dataset } from '@server/modules/datasets/dataset.entity'
import { buildDataset, buildMember, buildProject, buildUser } from '../fixtures/builders'
import { createTestApp, type TestApp } from '../fixtures/test-app'

let t: TestApp
let now: Date
let steward: { email: string }
beforeAll(async () => {
  t = await createTestApp({ EMBARGO_REMINDER_DAYS: '7' })
  steward = await buildUser(t.em(), { siteRole: 'steward' })
})
afterAll(() => t.close())

function scheduler() {
  const logger = createLogger('silent')
  return createEmbargoScheduler({
    orm: t.orm,
    logger,
    config: t.config,
    mailer: createMailer(t.mail.url, t.config.mailFrom, logger),
    clock: () => now,
  })
}

async function embargoedDataset(until: string) {
  const owner = await buildMember(t.em())
  const project = await buildProject(t.em(), [{ user: owner, role: 'owner' }])
  const dataset = await buildDataset(t.em(), project.id, {
    state: 'approved',
    embargoUntil: new Date(until),
  })
  return { owner, dataset }
}

const releases = (accession: string) =>
  t.em().find(AuditEvent, { action: 'dataset.release', targetId: accession })

/** Mail is delivered over SMTP after the tick; wait for what the tick sent. */
async function mailAbout(accession: string, to: string, words: string, count = 1) {
  const until = Date.now() + 3000
  for (;;) {
    const found = t.mail.messages.filter(
      (m) => m.to.includes(to) && m.subject.includes(accession) && m.subject.includes(words),
    )
    if (found.length >= count || Date.now() > until) return found
    await new Promise((r) => setTimeout(r, 20))
  }
}

beforeEach(() => {
  now = new Date('2030-01-01T00:00:00Z')
})

describe('release at the end of an embargo', () => {
  it('keeps an embargo until its end, releases it at the end exactly, and only once', async () => {
    const { owner, dataset } = await embargoedDataset('2030-06-01T00:00:00Z')
    const s = scheduler()

    now = new Date('2030-05-31T23:59:59.999Z')
    expect((await s.tick()).released).not.toContain(dataset.accession)
    expect(await releases(dataset.accession)).toHaveLength(0)

    now = new Date('2030-06-01T00:00:00.000Z')
    expect((await s.tick()).released).toEqual([dataset.accession])
    now = new Date('2030-06-01T00:01:00.000Z')
    expect((await s.tick()).released).toEqual([])
    now = new Date('2030-06-05T00:00:00.000Z')
    expect((await s.tick()).released).toEqual([])

    const events = await releases(dataset.accession)
    expect(events).toHaveLength(1)
    expect(events[0]!.actor).toBeNull()
    expect(events[0]!.time.toISOString()).toBe('2030-06-01T00:00:00.000Z')
    expect(events[0]!.details).toEqual({ scheduledFor: '2030-06-01T00:00:00.000Z' })
    expect(await mailAbout(dataset.accession, owner.email, 'now public')).toHaveLength(1)
    expect(await mailAbout(dataset.accession, steward.email, 'now public')).toHaveLength(1)
  })

  it('leaves drafts, submitted and withdrawn datasets with a past date alone', async () => {
    const owner = await buildMember(t.em())
    const project = await buildProject(t.em(), [{ user: owner, role: 'owner' }])
    const past = new Date('2029-01-01T00:00:00Z')
    const others = await Promise.all(
      (['draft', 'submitted', 'withdrawn'] as const).map((state) =>
        buildDataset(t.em(), project.id, { state, embargoUntil: past }),
      ),
    )
    const { released } = await scheduler().tick()
    for (const d of others) expect(released).not.toContain(d.accession)
  })
})

describe('midnight in zones far from UTC', () => {
  // Pacific/Kiritimati is UTC+14 and Pacific/Pago_Pago UTC−11 all year (no daylight saving).
  const localDay = (instant: Date, timeZone: string) =>
    new Intl.DateTimeFormat('en-CA', { timeZone }).format(instant)

  it('does not release at local midnight of the end day in Kiritimati (still 10:00 UTC the day before)', async () => {
    const { dataset } = await embargoedDataset('2030-03-01T00:00:00Z')
    const kiritimatiMidnight = new Date('2030-02-28T10:00:00Z')
    expect(localDay(kiritimatiMidnight, 'Pacific/Kiritimati')).toBe('2030-03-01')
    expect(localDay(new Date(kiritimatiMidnight.getTime() - 1), 'Pacific/Kiritimati')).toBe(
      '2030-02-28',
    )

    now = kiritimatiMidnight
    expect((await scheduler().tick()).released).not.toContain(dataset.accession)
    expect(accessPhase(dataset, now)).toBe('embargoed')
    now = new Date('2030-03-01T00:00:00Z')
    expect((await scheduler().tick()).released).toContain(dataset.accession)
    expect(accessPhase(dataset, now)).toBe('released')
  })

  it('releases in the afternoon of the day before in Pago Pago, not at its local midnight', async () => {
    const { dataset } = await embargoedDataset('2030-03-02T00:00:00Z')
    const end = new Date('2030-03-02T00:00:00Z')
    expect(localDay(end, 'Pacific/Pago_Pago')).toBe('2030-03-01')

    now = new Date(end.getTime() - 1)
    expect((await scheduler().tick()).released).not.toContain(dataset.accession)
    now = end
    expect((await scheduler().tick()).released).toContain(dataset.accession)
    // Local midnight of 2 March in Pago Pago is 11:00 UTC: released hours before it.
    const pagoMidnight = new Date('2030-03-02T11:00:00Z')
    expect(localDay(pagoMidnight, 'Pacific/Pago_Pago')).toBe('2030-03-02')
    expect(localDay(new Date(pagoMidnight.getTime() - 1), 'Pacific/Pago_Pago')).toBe('2030-03-01')
  })
})

describe('catching up after downtime', () => {
  it('releases at start-up every embargo that ended while the scheduler was down', async () => {
    const ends = ['2031-01-03', '2031-01-10', '2031-02-01']
    const missed = await Promise.all(ends.map((d) => embargoedDataset(`${d}T00:00:00Z`)))
    const future = await embargoedDataset('2031-09-01T00:00:00Z')

    // Last seen running before all of them ended…
    now = new Date('2031-01-01T12:00:00Z')
    const before = scheduler()
    await before.tick()
    // …down for six weeks, then started again.
    now = new Date('2031-02-15T08:30:00Z')
    const after = scheduler()
    const caughtUp = await after.start()
    after.stop()

    expect(caughtUp.released).toEqual(missed.map((m) => m.dataset.accession))
    expect(caughtUp.released).not.toContain(future.dataset.accession)
    for (const m of missed) {
      const notices = await t.em().find(EmbargoNotice, { dataset: m.dataset.id, kind: 'release' })
      expect(notices.map((n) => n.doneAt.toISOString())).toEqual(['2031-02-15T08:30:00.000Z'])
      expect(await releases(m.dataset.accession)).toHaveLength(1)
    }
    // A second start (say another restart at the same time) finds nothing left to do.
    const again = scheduler()
    expect((await again.start()).released).toEqual([])
    again.stop()
  })
})

describe('reminders before the end', () => {
  it('reminds owners and stewards once inside the window, and again for a new end date', async () => {
    const { owner, dataset } = await embargoedDataset('2032-04-20T00:00:00Z')
    const s = scheduler()

    now = new Date('2032-04-12T23:59:00Z') // 7 days and a minute before
    expect((await s.tick()).reminded).not.toContain(dataset.accession)
    now = new Date('2032-04-13T00:00:00Z') // exactly 7 days before
    expect((await s.tick()).reminded).toEqual([dataset.accession])
    for (const minute of [1, 2, 60, 60 * 24]) {
      now = new Date(Date.parse('2032-04-13T00:00:00Z') + minute * 60_000)
      expect((await s.tick()).reminded).toEqual([])
    }
    expect(await mailAbout(dataset.accession, owner.email, 'embargo ends')).toHaveLength(1)
    expect(await mailAbout(dataset.accession, steward.email, 'embargo ends')).toHaveLength(1)

    // A steward extends the embargo by a month; the new end gets its own reminder in its window.
    await t
      .em()
      .nativeUpdate(Dataset, { id: dataset.id }, { embargoUntil: new Date('2032-05-20T00:00:00Z') })
    now = new Date('2032-05-12T00:00:00Z')
    expect((await s.tick()).reminded).toEqual([])
    now = new Date('2032-05-14T00:00:00Z')
    expect((await s.tick()).reminded).toEqual([dataset.accession])
    expect(await mailAbout(dataset.accession, owner.email, 'embargo ends', 2)).toHaveLength(2)
  })

  it('sends no reminder when the window is set to zero days', async () => {
    const { dataset } = await embargoedDataset('2030-01-02T00:00:00Z')
    const logger = createLogger('silent')
    const s = createEmbargoScheduler({
      orm: t.orm,
      logger,
      config: { ...t.config, embargo: { ...t.config.embargo, reminderDays: 0 } },
      mailer: createMailer(t.mail.url, t.config.mailFrom, logger),
      clock: () => now,
    })
    expect((await s.tick()).reminded).not.toContain(dataset.accession)
    expect(await t.em().count(EmbargoNotice, { dataset: dataset.id })).toBe(0)
  })
})
