import { accessPhase, type AccessPhase } from '@shared/domain/dataset-state'
import { datasetSubject, type DatasetSubject } from '@shared/permissions/abilities'
import type { DatasetDto } from '@shared/schemas/dataset.schema'

/** JSON carries embargo dates as `YYYY-MM-DD`; an embargo ends at 00:00 UTC of that day. */
export function embargoDate(day: string | null): Date | null {
  return day ? new Date(`${day}T00:00:00Z`) : null
}

type DatasetFacts = Pick<DatasetDto, 'id' | 'state' | 'embargoUntil'> & {
  project: { id: number }
}

/** The CASL subject for a dataset as the API returned it (dates become Date objects). */
export function subjectOf(dto: DatasetFacts): DatasetSubject {
  return datasetSubject({
    id: dto.id,
    project: dto.project.id,
    state: dto.state,
    embargoUntil: embargoDate(dto.embargoUntil),
  })
}

export function phaseOf(dto: Pick<DatasetDto, 'state' | 'embargoUntil'>): AccessPhase {
  return accessPhase({ state: dto.state, embargoUntil: embargoDate(dto.embargoUntil) })
}

/** The subject of a not-yet-existing draft, to ask whether one may be created in a project. */
export const newDraftIn = (projectId: number): DatasetSubject =>
  datasetSubject({ id: 0, project: projectId, state: 'draft', embargoUntil: null })

/** The describe page of a dataset, opened at one field when `field` (a dotted path) is given. */
export const describeRoute = (accession: string, field?: string) => ({
  name: 'dataset-describe',
  params: { idOrAccession: accession },
  ...(field ? { query: { field } } : {}),
})
