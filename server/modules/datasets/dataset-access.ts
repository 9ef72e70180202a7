import type { EntityManager } from '@mikro-orm/better-sqlite'
import { z } from 'zod'
import type { Request } from 'express'
import { datasetSubject } from '@shared/permissions/abilities'
import type { DatasetAction } from '@shared/permissions/actions'
import { ForbiddenError, NotFoundError } from '../../errors/http-error'
import { Dataset, type IDataset } from './dataset.entity'

/** The `:id` path parameter of every dataset route: a numeric id or an accession. */
export const datasetParams = z.object({ id: z.string().min(1).max(40) })

/** Finds a dataset by numeric id or by accession (STPL-000123, any case). */
export async function findDataset(
  em: EntityManager,
  idOrAccession: string,
): Promise<IDataset | null> {
  if (/^\d+$/.test(idOrAccession)) return em.findOne(Dataset, { id: Number(idOrAccession) })
  return em.findOne(Dataset, { accession: idOrAccession.toUpperCase() })
}

export const subjectOf = (d: DatasetFacts) => datasetSubject(d)

/** What an access decision needs of a dataset: the entity, or the same facts read without it. */
export type DatasetFacts = Pick<IDataset, 'id' | 'accession' | 'project' | 'state' | 'embargoUntil'>

/**
 * Checks the action on a dataset found (or not) by `idOrAccession`. Someone who may not even read
 * it gets 404, so existence does not leak; someone who may read it but not do this gets 403.
 */
export function authorise<T extends DatasetFacts>(
  req: Request,
  dataset: T | null | undefined,
  idOrAccession: string,
  action: DatasetAction,
): T {
  if (!dataset || !req.ability.can('read', subjectOf(dataset))) {
    throw new NotFoundError('dataset', idOrAccession)
  }
  if (action !== 'read' && !req.ability.can(action, subjectOf(dataset))) {
    throw new ForbiddenError(forbiddenDetail(action, dataset))
  }
  return dataset
}

/** Loads a dataset and checks the action (see authorise). */
export async function datasetFor(
  req: Request,
  em: EntityManager,
  idOrAccession: string,
  action: DatasetAction,
): Promise<IDataset> {
  return authorise(req, await findDataset(em, idOrAccession), idOrAccession, action)
}

function forbiddenDetail(action: DatasetAction, d: DatasetFacts): string {
  const state = d.state.replace('_', ' ')
  switch (action) {
    case 'edit':
    case 'submit':
    case 'delete':
      return `You cannot ${action} ${d.accession}: it is ${state}, or you are not a depositor of its project.`
    case 'reviewer_link':
      return d.state === 'draft'
        ? `${d.accession} is a draft. Reviewer links open submitted data only: submit it first.`
        : `Only the project's owners and the editors of a manuscript it is attached to can manage reviewer links of ${d.accession} while it is ${state}.`
    case 'preview':
    case 'download':
      return `The files and previews of ${d.accession} are not open to you (embargo, state or sharing).`
    default:
      return `You are not allowed to ${action} ${d.accession} while it is ${state}.`
  }
}
