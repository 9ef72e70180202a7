import { UniqueConstraintViolationException } from '@mikro-orm/core'
import type { EntityManager } from '@mikro-orm/better-sqlite'
import type { AppConfig } from '../../config'
import type { Mailer } from '../mail/mailer'
import { audit } from '../audit/audit.service'
import { Dataset, type IDataset } from '../datasets/dataset.entity'
import { Membership } from '../projects/project.entity'
import { User } from '../users/user.entity'
import { EmbargoNotice, type EmbargoNoticeKind } from './embargo-notice.entity'

const DAY_MS = 86_400_000

export interface EmbargoScheduleDeps {
  mailer: Mailer
  config: Pick<AppConfig, 'publicUrl' | 'embargo'>
}

export interface EmbargoTickResult {
  /** Accessions released in this tick (their embargo ended since the last tick or downtime). */
  released: string[]
  /** Accessions whose owners and stewards were reminded in this tick. */
  reminded: string[]
}

/** An embargo end as people read it: the day in UTC, and the time when it is not midnight. */
export function formatEmbargoEnd(end: Date): string {
  const iso = end.toISOString()
  return iso.endsWith('T00:00:00.000Z')
    ? `${iso.slice(0, 10)} (00:00 UTC)`
    : `${iso.slice(0, 16).replace('T', ' ')} UTC`
}

/** The dataset's project owners, its depositor and every active steward: who hears about it. */
async function recipients(em: EntityManager, dataset: IDataset): Promise<string[]> {
  const owners = await em.find(Membership, { project: dataset.project, role: 'owner' })
  const ids = [...owners.map((m) => m.user), ...(dataset.createdBy ? [dataset.createdBy] : [])]
  const users = await em.find(User, {
    deactivatedAt: null,
    $or: [{ id: { $in: ids } }, { siteRole: 'steward' }],
  })
  return [...new Set(users.map((u) => u.email))].sort()
}

/**
 * Claims one notice (reminder or release) for a dataset's current embargo end. The row and the
 * audit event commit together; if the row exists already (an earlier tick, another process), the
 * claim fails and nothing is written or sent.
 */
async function claim(
  em: EntityManager,
  dataset: IDataset,
  kind: EmbargoNoticeKind,
  now: Date,
  lifted: { end: Date; reason: string } | null = null,
): Promise<boolean> {
  const end = lifted?.end ?? dataset.embargoUntil!
  try {
    await em.transactional(async (tem) => {
      tem.create(EmbargoNotice, { dataset: dataset.id, kind, embargoUntil: end, doneAt: now })
      if (kind === 'release') {
        audit(tem, null, {
          action: 'dataset.release',
          targetType: 'Dataset',
          targetId: dataset.accession,
          details: {
            scheduledFor: end.toISOString(),
            ...(lifted ? { lifted: true, reason: lifted.reason } : {}),
          },
          at: now,
        })
        // Touching the row raises the access version, so cached lists and pages read afresh.
        await tem.nativeUpdate(Dataset, { id: dataset.id }, { updatedAt: now })
      }
    })
    return true
  } catch (err) {
    if (err instanceof UniqueConstraintViolationException) return false
    throw err
  }
}

async function alreadyDone(em: EntityManager, datasets: IDataset[], kind: EmbargoNoticeKind) {
  if (!datasets.length) return new Set<string>()
  const notices = await em.find(EmbargoNotice, {
    kind,
    dataset: { $in: datasets.map((d) => d.id) },
  })
  return new Set(notices.map((n) => `${n.dataset}@${n.embargoUntil.getTime()}`))
}

const pending = async (em: EntityManager, datasets: IDataset[], kind: EmbargoNoticeKind) => {
  const done = await alreadyDone(em, datasets, kind)
  return datasets.filter((d) => !done.has(`${d.id}@${d.embargoUntil!.getTime()}`))
}

/**
 * One pass of the embargo schedule at `now` (the injected clock, UTC instants throughout):
 * releases every approved dataset whose embargo ended and was not released yet, however long
 * ago (so the first pass after downtime catches up on all of them), and reminds owners and
 * stewards of embargoes ending within the reminder window, once per dataset and embargo end.
 */
export async function runEmbargoSchedule(
  em: EntityManager,
  deps: EmbargoScheduleDeps,
  now: Date,
): Promise<EmbargoTickResult> {
  const result: EmbargoTickResult = { released: [], reminded: [] }
  const ended = await em.find(
    Dataset,
    { state: 'approved', embargoUntil: { $ne: null, $lte: now } },
    { orderBy: { embargoUntil: 'asc', id: 'asc' } },
  )
  for (const dataset of await pending(em, ended, 'release')) {
    if (!(await claim(em, dataset, 'release', now))) continue
    result.released.push(dataset.accession)
    await notify(em, deps, dataset, 'release')
  }

  const days = deps.config.embargo.reminderDays
  if (days > 0) {
    const soon = await em.find(
      Dataset,
      {
        state: 'approved',
        embargoUntil: { $gt: now, $lte: new Date(now.getTime() + days * DAY_MS) },
      },
      { orderBy: { embargoUntil: 'asc', id: 'asc' } },
    )
    for (const dataset of await pending(em, soon, 'reminder')) {
      if (!(await claim(em, dataset, 'reminder', now))) continue
      result.reminded.push(dataset.accession)
      await notify(em, deps, dataset, 'reminder')
    }
  }
  return result
}

/**
 * A steward lifted an approved dataset's running embargo: it is public from now, so it gets the
 * release a scheduled end would have given (one `dataset.release` entry, the notice mail), once
 * per lifted end. The scheduler never sees it, as the dataset no longer has an end.
 */
export async function releaseLiftedEmbargo(
  em: EntityManager,
  deps: EmbargoScheduleDeps,
  dataset: IDataset,
  lifted: { end: Date; reason: string },
  now: Date,
): Promise<boolean> {
  if (!(await claim(em, dataset, 'release', now, lifted))) return false
  await notify(em, deps, dataset, 'release', lifted.end)
  return true
}

async function notify(
  em: EntityManager,
  deps: EmbargoScheduleDeps,
  dataset: IDataset,
  kind: EmbargoNoticeKind,
  liftedEnd: Date | null = null,
) {
  const end = formatEmbargoEnd(liftedEnd ?? dataset.embargoUntil!)
  const link = `${deps.config.publicUrl}/datasets/${dataset.accession}`
  const mail = liftedEnd
    ? {
        subject: `${dataset.accession} is now public: its embargo was lifted`,
        text: `A data steward lifted the embargo on ${dataset.accession} "${dataset.title}", which was to end on ${end}. Its files are now public.\n\n${link}\n`,
      }
    : kind === 'release'
      ? {
          subject: `${dataset.accession} is now public: its embargo ended`,
          text: `The embargo on ${dataset.accession} "${dataset.title}" ended on ${end}. Its files are now public.\n\n${link}\n`,
        }
      : {
          subject: `${dataset.accession}: embargo ends ${end}`,
          text: `The embargo on ${dataset.accession} "${dataset.title}" ends on ${end}; its files become public then.\nA data steward can extend, shorten or lift the embargo before that day, with a reason.\n\n${link}\n`,
        }
  // One SMTP connection per message: sent together, not one after another (~0.1 s each).
  await Promise.all((await recipients(em, dataset)).map((to) => deps.mailer.send({ to, ...mail })))
}
