import type { Request } from 'express'
import { datasetSubject } from '@shared/permissions/abilities'
import { ForbiddenError, NotFoundError } from '../../errors/http-error'
import type { IDataset } from '../datasets/dataset.entity'
import { reviewedVersion } from '../reviewer-links/reviewer-access'

const REVISING_STATES: readonly IDataset['state'][] = ['draft', 'submitted', 'changes_requested']

/**
 * The dataset as its latest approved version stands: while the next version is a draft (or in
 * curation), the approved one keeps the access it had when approved, embargo included. A dataset
 * that was never approved, or is withdrawn, is taken as it is.
 */
export function asReleased(dataset: IDataset) {
  const revising = REVISING_STATES.includes(dataset.state) && dataset.version > 1
  return datasetSubject(revising ? { ...dataset, state: 'approved' } : dataset)
}

/**
 * Whether this person may read the dataset's versions (404 otherwise, as for the dataset), whether
 * the frozen file lists are open to them (the preview right, as for files and previews) and
 * whether they may download the frozen files. A reviewer link opens the one version it was made
 * for, lists and downloads included, even when the dataset has moved on to a later draft;
 * `onlyVersion` is set when that link is the reader's only way in.
 */
export function versionAccess(req: Request, dataset: IDataset, number?: number) {
  const actual = datasetSubject(dataset)
  const released = asReleased(dataset)
  const can = (action: 'read' | 'preview' | 'download') =>
    req.ability.can(action, actual) || req.ability.can(action, released)
  const reviewed = reviewedVersion(req, dataset.id)
  const readable = can('read')
  if (!readable && (reviewed === null || (number !== undefined && number !== reviewed)))
    throw new NotFoundError('dataset', dataset.accession)
  const theLinkedOne = reviewed !== null && (number === undefined || number === reviewed)
  return {
    filesOpen: can('preview') || theLinkedOne,
    download: can('download') || theLinkedOne,
    onlyVersion: readable ? null : reviewed,
  }
}

/** Starting a new version is for those who may edit the dataset as a draft: its depositors. */
export function assertCanRevise(req: Request, dataset: IDataset) {
  versionAccess(req, dataset)
  if (!req.ability.can('edit', datasetSubject({ ...dataset, state: 'draft' })))
    throw new ForbiddenError(`Only the depositors of ${dataset.accession} can start a new version.`)
}

/** Retrying a DOI registration is for those who curate the dataset: stewards. */
export function assertCanCurate(req: Request, dataset: IDataset) {
  versionAccess(req, dataset)
  if (!req.ability.can('curate', datasetSubject({ ...dataset, state: 'submitted' })))
    throw new ForbiddenError(
      `Only stewards can retry the DOI registration of ${dataset.accession}.`,
    )
}
