import type { EntityManager } from '@mikro-orm/better-sqlite'
import { UniqueConstraintViolationException } from '@mikro-orm/core'
import type {
  AttachDatasetInput,
  CreateManuscriptInput,
  JournalDto,
  ManuscriptDto,
} from '@shared/schemas/manuscript.schema'
import {
  ConflictError,
  ForbiddenError,
  NotFoundError,
  ValidationError,
} from '../../errors/http-error'
import type { Actor } from '../../services'
import { audit } from '../audit/audit.service'
import { authorise, findDataset, subjectOf } from '../datasets/dataset-access'
import { Dataset, type IDataset } from '../datasets/dataset.entity'
import { liveLinkCounts } from '../reviewer-links/reviewer-links.service'
import { User } from '../users/user.entity'
import { journalsEditedBy } from './journal-editors'
import { Journal, Manuscript, ManuscriptDataset, type IManuscript } from './manuscript.entity'

type SignedIn = Actor & { user: NonNullable<Actor['user']> }

export async function listJournals(em: EntityManager): Promise<JournalDto[]> {
  const journals = await em.find(Journal, {}, { orderBy: { name: 'asc' } })
  return journals.map((j) => ({ id: j.id, name: j.name }))
}

/** Journals whose manuscripts this person sees as an editor (only with the editor site role). */
async function editedJournals(em: EntityManager, actor: SignedIn): Promise<number[]> {
  return actor.user.siteRole === 'editor' ? journalsEditedBy(em, actor.user.id) : []
}

/**
 * Who sees a manuscript: whoever created it, the editors of its journal and site admins (the
 * depositors of an attached dataset see it on that dataset's page, see manuscriptsOfDataset).
 */
const maySee = (actor: SignedIn, m: IManuscript, journals: number[]) =>
  m.createdBy === actor.user.id || journals.includes(m.journal) || actor.user.siteRole === 'admin'

/** Datasets referred to by accession or id, each checked for the share right (attaching opens it to editors). */
async function attachable(em: EntityManager, actor: Actor, refs: (string | number)[]) {
  const out: IDataset[] = []
  for (const ref of refs) {
    const key = String(ref)
    out.push(authorise(actor as never, await findDataset(em, key), key, 'share'))
  }
  return out
}

function attach(em: EntityManager, actor: SignedIn, manuscript: IManuscript, dataset: IDataset) {
  em.create(ManuscriptDataset, {
    manuscript: manuscript.id,
    dataset: dataset.id,
    attachedBy: actor.user.id,
  })
  audit(em, actor, {
    action: 'manuscript.attach',
    targetType: 'Dataset',
    targetId: dataset.accession,
    details: { manuscript: manuscript.id, reference: manuscript.reference },
  })
}

export async function createManuscript(
  em: EntityManager,
  actor: SignedIn,
  input: CreateManuscriptInput,
  now: Date,
): Promise<ManuscriptDto> {
  const journal = await em.findOne(Journal, { id: input.journalId })
  if (!journal)
    throw new ValidationError(
      [{ pointer: '/journalId', detail: 'No such journal' }],
      'No such journal.',
    )
  const datasets = await attachable(em, actor, input.datasets)
  const manuscript = em.create(Manuscript, {
    journal: journal.id,
    reference: input.reference,
    title: input.title,
    createdBy: actor.user.id,
  })
  try {
    await em.flush()
  } catch (error) {
    if (error instanceof UniqueConstraintViolationException)
      throw new ConflictError(
        `${journal.name} already has a manuscript ${input.reference} here; attach the data to it instead.`,
      )
    throw error
  }
  audit(em, actor, {
    action: 'manuscript.create',
    targetType: 'Manuscript',
    targetId: manuscript.id,
    details: { journal: journal.name, reference: manuscript.reference },
  })
  for (const dataset of new Map(datasets.map((d) => [d.id, d])).values())
    attach(em, actor, manuscript, dataset)
  await em.flush()
  return (await toManuscriptDtos(em, actor, [manuscript], now))[0]!
}

async function visibleManuscript(em: EntityManager, actor: SignedIn, id: number) {
  const manuscript = await em.findOne(Manuscript, { id })
  if (!manuscript || !maySee(actor, manuscript, await editedJournals(em, actor)))
    throw new NotFoundError('manuscript', id)
  return manuscript
}

/** Attaching needs the share right on the dataset and a manuscript one created (or an admin). */
export async function attachDataset(
  em: EntityManager,
  actor: SignedIn,
  manuscriptId: number,
  input: AttachDatasetInput,
  now: Date,
): Promise<ManuscriptDto> {
  const manuscript = await visibleManuscript(em, actor, manuscriptId)
  if (manuscript.createdBy !== actor.user.id && actor.user.siteRole !== 'admin')
    throw new ForbiddenError(
      'Only the depositor who created this manuscript can attach data to it.',
    )
  const [dataset] = await attachable(em, actor, [input.dataset])
  const already = await em.count(ManuscriptDataset, {
    manuscript: manuscript.id,
    dataset: dataset!.id,
  })
  if (!already) attach(em, actor, manuscript, dataset!)
  await em.flush()
  return (await toManuscriptDtos(em, actor, [manuscript], now))[0]!
}

export async function detachDataset(
  em: EntityManager,
  actor: SignedIn,
  manuscriptId: number,
  datasetRef: string,
): Promise<void> {
  const manuscript = await visibleManuscript(em, actor, manuscriptId)
  const [dataset] = await attachable(em, actor, [datasetRef])
  const row = await em.findOne(ManuscriptDataset, {
    manuscript: manuscript.id,
    dataset: dataset!.id,
  })
  if (!row) throw new NotFoundError('attached dataset', datasetRef)
  em.remove(row)
  audit(em, actor, {
    action: 'manuscript.detach',
    targetType: 'Dataset',
    targetId: dataset!.accession,
    details: { manuscript: manuscript.id, reference: manuscript.reference },
  })
  await em.flush()
}

/** The manuscripts on this person's page: those they created, and their journals' as an editor. */
export async function listManuscripts(
  em: EntityManager,
  actor: SignedIn,
  now: Date,
): Promise<ManuscriptDto[]> {
  const journals = await editedJournals(em, actor)
  const where =
    actor.user.siteRole === 'admin'
      ? {}
      : { $or: [{ createdBy: actor.user.id }, { journal: { $in: journals } }] }
  const manuscripts = await em.find(Manuscript, where, {
    orderBy: { createdAt: 'desc', id: 'desc' },
  })
  return toManuscriptDtos(em, actor, manuscripts, now)
}

/** Manuscripts a dataset is attached to, for its depositors (share right) and the editors involved. */
export async function manuscriptsOfDataset(
  em: EntityManager,
  actor: SignedIn,
  dataset: IDataset,
  now: Date,
): Promise<ManuscriptDto[]> {
  const rows = await em.find(ManuscriptDataset, { dataset: dataset.id })
  if (!rows.length) return []
  const journals = await editedJournals(em, actor)
  const depositor = actor.ability.can('share', subjectOf(dataset))
  const manuscripts = (
    await em.find(
      Manuscript,
      { id: { $in: rows.map((r) => r.manuscript) } },
      { orderBy: { id: 'asc' } },
    )
  ).filter((m) => depositor || maySee(actor, m, journals))
  return toManuscriptDtos(em, actor, manuscripts, now)
}

/** DTOs with only the datasets this person may read; the others are counted, not named. */
async function toManuscriptDtos(
  em: EntityManager,
  actor: Actor,
  manuscripts: IManuscript[],
  now: Date,
): Promise<ManuscriptDto[]> {
  if (!manuscripts.length) return []
  const ids = manuscripts.map((m) => m.id)
  const [links, journals] = await Promise.all([
    em.find(ManuscriptDataset, { manuscript: { $in: ids } }, { orderBy: { id: 'asc' } }),
    em.find(Journal, { id: { $in: [...new Set(manuscripts.map((m) => m.journal))] } }),
  ])
  const datasets = links.length
    ? await em.find(Dataset, { id: { $in: [...new Set(links.map((l) => l.dataset))] } })
    : []
  const readable = new Map(
    datasets.filter((d) => actor.ability.can('read', subjectOf(d))).map((d) => [d.id, d]),
  )
  const live = await liveLinkCounts(em, [...readable.keys()], now)
  const creators = manuscripts.map((m) => m.createdBy).filter((id): id is number => id != null)
  const users = creators.length ? await em.find(User, { id: { $in: creators } }) : []
  const userName = new Map(users.map((u) => [u.id, u.name]))
  const journalName = new Map(journals.map((j) => [j.id, j.name]))
  return manuscripts.map((m) => {
    const attached = links.filter((l) => l.manuscript === m.id)
    const shown = attached.map((l) => readable.get(l.dataset)).filter((d) => d !== undefined)
    return {
      id: m.id,
      journal: { id: m.journal, name: journalName.get(m.journal) ?? '' },
      reference: m.reference,
      title: m.title,
      createdAt: m.createdAt.toISOString(),
      createdBy:
        m.createdBy != null ? { id: m.createdBy, name: userName.get(m.createdBy) ?? '' } : null,
      datasets: shown.map((d) => ({
        id: d.id,
        accession: d.accession,
        title: d.title,
        state: d.state,
        embargoUntil: d.embargoUntil ? d.embargoUntil.toISOString().slice(0, 10) : null,
        liveReviewerLinks: live.get(d.id) ?? 0,
      })),
      hiddenDatasets: attached.length - shown.length,
    }
  })
}
