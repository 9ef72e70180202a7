import {
  AbilityBuilder,
  createMongoAbility,
  detectSubjectType as detectCaslSubjectType,
  type ExtractSubjectType,
  type MongoAbility,
  type MongoQuery,
} from '@casl/ability'
import type { AccessPhase, DatasetState } from '../domain/dataset-state'
import type { ProjectRole, ShareCapability } from '../domain/roles'
import { DATASET_ACTIONS, PROJECT_ACTIONS, type AppAction, type DatasetAction } from './actions'
import { DATASET_MATRIX, PROJECT_MATRIX, type MatrixRole } from './matrix'
import type { Viewer } from './viewer'

/** The facts about a dataset that permissions depend on. `project` is the project's id. */
export interface DatasetSubject {
  __type: 'Dataset'
  id: number
  project: number
  state: DatasetState
  embargoUntil: Date | null
}
export interface ProjectSubject {
  __type: 'Project'
  id: number
}
export interface ApiTokenSubject {
  __type: 'ApiToken'
  user: number
}
export interface InstrumentProfileSubject {
  __type: 'InstrumentProfile'
  organization: number | null
}
type SubjectObject = DatasetSubject | ProjectSubject | ApiTokenSubject | InstrumentProfileSubject
export type SubjectName =
  | 'Dataset'
  | 'Project'
  | 'ApiToken'
  | 'InstrumentProfile'
  | 'User'
  | 'Organization'
  | 'AuditEvent'
  | 'Mail'
  | 'all'
export type AppAbility = MongoAbility<[AppAction, SubjectName | SubjectObject]>

export function datasetSubject(
  facts: Omit<DatasetSubject, '__type' | 'embargoUntil'> & { embargoUntil?: Date | null },
): DatasetSubject {
  return {
    __type: 'Dataset',
    id: facts.id,
    project: facts.project,
    state: facts.state,
    embargoUntil: facts.embargoUntil ?? null,
  }
}
export const projectSubject = (id: number): ProjectSubject => ({ __type: 'Project', id })

/** CASL conditions that select datasets in the given access phases (see accessPhase()). */
function phaseConditions(phases: readonly AccessPhase[], now: Date): MongoQuery[] {
  const plain: DatasetState[] = phases.filter(
    (p): p is Exclude<AccessPhase, 'embargoed' | 'released'> =>
      p !== 'embargoed' && p !== 'released',
  )
  const embargoed = phases.includes('embargoed')
  const released = phases.includes('released')
  if (embargoed && released) plain.push('approved')
  if (plain.length === 5) return [{}]
  const out: MongoQuery[] = []
  if (plain.length) out.push({ state: { $in: plain } })
  if (embargoed && !released) out.push({ state: 'approved', embargoUntil: { $gt: now } })
  if (released && !embargoed) {
    out.push({ state: 'approved', embargoUntil: null })
    out.push({ state: 'approved', embargoUntil: { $lte: now } })
  }
  return out
}

function projectIds(viewer: Viewer, roles: ProjectRole[]): number[] {
  return viewer.memberships.filter((m) => roles.includes(m.role)).map((m) => m.projectId)
}

function sharedIds(viewer: Viewer, capability: ShareCapability | null): number[] {
  return viewer.shares
    .filter((s) => capability === null || s.capabilities.includes(capability))
    .map((s) => s.datasetId)
}

const CAPABILITY_OF: Partial<Record<DatasetAction, ShareCapability>> = {
  preview: 'preview',
  annotate: 'annotate',
  download: 'download',
}

/**
 * The abilities of one person (or of the public when viewer is null), evaluated at `now`.
 * `reviewing` lists the datasets of the live reviewer links presented with the request (checked by
 * the server against the database on every request); they add the reviewer row for those only.
 */
export function defineAbilityFor(
  viewer: Viewer | null,
  now: Date = new Date(),
  reviewing: readonly number[] = [],
): AppAbility {
  const { can, build } = new AbilityBuilder<AppAbility>(createMongoAbility)
  // An empty condition object must become an unconditional rule: rulesToQuery would otherwise emit
  // `$or: [{}, …]`, and the ORM drops empty members of $or, narrowing the list wrongly.
  const grant = (action: AppAction, subject: 'Dataset' | 'Project', conditions: MongoQuery) =>
    Object.keys(conditions).length ? can(action, subject, conditions) : can(action, subject)

  const grantDataset = (role: MatrixRole, scope: MongoQuery) => {
    for (const action of DATASET_ACTIONS) {
      for (const condition of phaseConditions(DATASET_MATRIX[role][action], now)) {
        grant(action, 'Dataset', { ...scope, ...condition })
      }
    }
  }
  /** Shares: reading comes with every share; each other action only with its capability. */
  const grantShares = (shared: Viewer) => {
    for (const action of DATASET_ACTIONS) {
      const capability = action === 'read' ? null : CAPABILITY_OF[action]
      if (capability === undefined) continue
      const ids = sharedIds(shared, capability)
      if (!ids.length) continue
      for (const condition of phaseConditions(DATASET_MATRIX.collaborator[action], now)) {
        grant(action, 'Dataset', { id: { $in: ids }, ...condition })
      }
    }
  }
  const grantProject = (role: MatrixRole, scope: MongoQuery, datasetScope: MongoQuery) => {
    for (const action of PROJECT_ACTIONS) {
      if (!PROJECT_MATRIX[role][action]) continue
      if (action === 'create_dataset') grant('create', 'Dataset', datasetScope)
      grant(action, 'Project', scope)
    }
  }

  grantDataset(viewer ? 'outsider' : 'public', {})
  if (reviewing.length) grantDataset('reviewer', { id: { $in: [...reviewing] } })
  if (!viewer) return build({ detectSubjectType })

  can(['create', 'read', 'manage'], 'ApiToken', { user: viewer.id })
  if (viewer.organizationId !== null || viewer.siteRole === 'admin') can('create', 'Project')
  // A lab's saved instrument descriptions are shared by everyone in that lab.
  if (viewer.organizationId !== null) {
    can(['create', 'read', 'manage'], 'InstrumentProfile', { organization: viewer.organizationId })
  }

  const site = viewer.siteRole
  if (site === 'editor') {
    // Editors see only what was attached to their journal's manuscripts, not the whole site.
    const attached = viewer.manuscriptDatasets ?? []
    if (attached.length) grantDataset('editor', { id: { $in: [...attached] } })
  } else if (site) {
    grantDataset(site, {})
    grantProject(site, {}, {})
  }
  if (site === 'admin') can('manage', ['User', 'Organization', 'AuditEvent', 'Mail'])
  if (site === 'steward') can('read', ['AuditEvent', 'User', 'Organization'])

  for (const role of ['owner', 'member', 'collaborator'] as const) {
    const ids = projectIds(viewer, [role])
    if (!ids.length) continue
    if (role !== 'collaborator') grantDataset(role, { project: { $in: ids } })
    grantProject(role, { id: { $in: ids } }, { project: { $in: ids } })
  }
  grantShares(viewer)

  return build({ detectSubjectType })
}

function detectSubjectType(object: SubjectObject | Record<string, unknown>) {
  const tagged = (object as { __type?: string }).__type
  return (tagged ?? detectCaslSubjectType(object)) as ExtractSubjectType<SubjectName>
}
