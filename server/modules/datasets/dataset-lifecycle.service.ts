import type { EntityManager } from '@mikro-orm/better-sqlite'
import { accessPhase } from '@shared/domain/dataset-state'
import type { ReviewDatasetBody, SetEmbargoBody } from '@shared/schemas/dataset.schema'
import { ConflictError, ValidationError } from '../../errors/http-error'
import type { Actor, AppDeps } from '../../services'
import { audit } from '../audit/audit.service'
import { assertReadyToSubmit } from '../metadata/metadata.service'
import {
  assertApprovable,
  assertHasValidatedFile,
  curationChecks,
} from '../curation/curation-checks'
import { notifyDepositor, recordCurationStep } from '../curation/curation.service'
import { releaseLiftedEmbargo } from '../embargo/embargo-schedule.service'
import { freezeVersion } from '../versions/versions.service'
import { User } from '../users/user.entity'
import type { IDataset } from './dataset.entity'
import { parseDay, toDatasetDto } from './dataset.mapper'

type Notify = Pick<AppDeps, 'mailer' | 'config'>
type Curate = Notify & Pick<AppDeps, 'storage'>

/** The latest embargo end the policy allows from `now`: the same day `maxYears` later (UTC). */
export function latestEmbargoEnd(now: Date, maxYears: number): Date {
  const latest = new Date(now)
  latest.setUTCFullYear(latest.getUTCFullYear() + maxYears)
  return latest
}

/**
 * An embargo end a steward may set: a day after today (UTC) and no later than the policy's
 * maximum length from now; anything else is a 400 naming the field.
 */
export function embargoEnd(
  value: string | null | undefined,
  pointer: string,
  now: Date,
  maxYears: number,
): Date | null {
  const day = parseDay(value)
  if (!day) return null
  if (day.getTime() <= now.getTime()) {
    throw new ValidationError([{ pointer, detail: 'The embargo must end on a future date.' }])
  }
  const latest = latestEmbargoEnd(now, maxYears)
  if (day.getTime() > latest.getTime()) {
    throw new ValidationError([
      {
        pointer,
        detail: `An embargo can last at most ${maxYears} year${maxYears === 1 ? '' : 's'}: the latest end is ${latest.toISOString().slice(0, 10)}.`,
      },
    ])
  }
  return day
}

/** Depositor → steward: draft or changes requested → submitted. The ability has checked the state. */
export async function submitDataset(
  em: EntityManager,
  actor: Actor,
  deps: Notify,
  dataset: IDataset,
  now = new Date(),
) {
  await assertReadyToSubmit(em, dataset)
  await assertHasValidatedFile(em, dataset)
  dataset.state = 'submitted'
  dataset.submittedAt = now
  recordCurationStep(em, dataset, { step: 'submitted', actor: actor.user?.id ?? null }, now)
  audit(em, actor, { action: 'dataset.submit', targetType: 'Dataset', targetId: dataset.accession })
  await em.flush()
  await notifyDepositor(
    em,
    deps,
    dataset,
    `Received for curation: ${dataset.accession}`,
    `Your dataset ${dataset.accession} "${dataset.title}" (version ${dataset.version}) was submitted and waits for a steward's check.`,
  )
  const stewards = await em.find(User, { siteRole: 'steward' })
  const link = `${deps.config.publicUrl}/datasets/${dataset.accession}`
  await Promise.all(
    stewards.map((s) =>
      deps.mailer.send({
        to: s.email,
        subject: `Submitted for curation: ${dataset.accession} ${dataset.title}`,
        text: `${dataset.accession} "${dataset.title}" waits for your curation check.\n\n${link}\n`,
      }),
    ),
  )
  return toDatasetDto(em, dataset)
}

/** The steward's decision: approve (optionally under embargo), request changes, or withdraw. */
export async function reviewDataset(
  em: EntityManager,
  actor: Actor,
  deps: Curate,
  dataset: IDataset,
  input: ReviewDatasetBody,
  now = new Date(),
) {
  const { decision, comment, embargoUntil, checklist } = input
  const phase = accessPhase(dataset, now)
  let checks
  if ((decision === 'approve' || decision === 'request_changes') && phase !== 'submitted') {
    throw new ConflictError(
      `Only submitted datasets can be approved or sent back; ${dataset.accession} is ${phase}.`,
    )
  }
  if (decision === 'withdraw' && dataset.state !== 'approved') {
    throw new ConflictError(
      `Only approved datasets can be withdrawn; ${dataset.accession} is ${phase}.`,
    )
  }
  if (decision === 'approve') {
    const requested =
      embargoUntil === undefined
        ? (dataset.embargoUntil ?? dataset.proposedEmbargoUntil)
        : embargoEnd(embargoUntil, '#/embargoUntil', now, deps.config.embargo.maxYears)
    const embargo = requested && requested.getTime() > now.getTime() ? requested : null
    checks = await curationChecks(em, dataset, deps.config.embargo, now, embargo)
    assertApprovable(dataset, checks, checklist)
    dataset.embargoUntil = embargo
    dataset.state = 'approved'
    dataset.approvedAt = now
    await freezeVersion(em, deps.storage, dataset, actor.user?.id ?? null, now)
  } else {
    checks = await curationChecks(em, dataset, deps.config.embargo, now)
    dataset.state = decision === 'withdraw' ? 'withdrawn' : 'changes_requested'
  }
  const step = {
    approve: 'approved',
    request_changes: 'changes_requested',
    withdraw: 'withdrawn',
  } as const
  recordCurationStep(
    em,
    dataset,
    { step: step[decision], actor: actor.user?.id ?? null, comment, checks, checklist },
    now,
  )
  audit(em, actor, {
    action: `dataset.${decision}`,
    targetType: 'Dataset',
    targetId: dataset.accession,
    details: { comment, embargoUntil: dataset.embargoUntil?.toISOString() ?? null },
  })
  await em.flush()
  const verdict = {
    approve: 'was approved',
    request_changes: 'needs changes',
    withdraw: 'was withdrawn',
  }[decision]
  const embargoNote = dataset.embargoUntil
    ? `\nIt stays under embargo until ${dataset.embargoUntil.toISOString().slice(0, 10)}.`
    : ''
  const frozen =
    decision === 'approve'
      ? `\nIt is frozen as version ${dataset.accession}.v${dataset.version}.`
      : ''
  await notifyDepositor(
    em,
    deps,
    dataset,
    `${dataset.accession} ${verdict}`,
    `Your dataset ${dataset.accession} "${dataset.title}" ${verdict}.${frozen}${embargoNote}${comment ? `\n\nThe steward wrote:\n${comment}` : ''}`,
  )
  return toDatasetDto(em, dataset)
}

/**
 * Set, extend, shorten or lift (until = null) the embargo; always with a reason, always audited
 * with the end before and after. Lifting a running embargo on an approved dataset releases it now,
 * with the release entry and notice a scheduled end gives.
 */
export async function setEmbargo(
  em: EntityManager,
  actor: Actor,
  deps: Notify,
  dataset: IDataset,
  input: SetEmbargoBody,
  now = new Date(),
) {
  const { until, reason } = input
  const previous = dataset.embargoUntil
  dataset.embargoUntil = embargoEnd(until, '#/until', now, deps.config.embargo.maxYears)
  audit(em, actor, {
    action: 'dataset.embargo',
    targetType: 'Dataset',
    targetId: dataset.accession,
    details: {
      reason,
      from: previous?.toISOString() ?? null,
      to: dataset.embargoUntil?.toISOString() ?? null,
    },
  })
  await em.flush()
  const lifted = !dataset.embargoUntil && previous && previous > now
  if (lifted && dataset.state === 'approved')
    await releaseLiftedEmbargo(em, deps, dataset, { end: previous, reason }, now)
  return toDatasetDto(em, dataset)
}
