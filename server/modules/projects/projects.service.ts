import { raw, type EntityManager } from '@mikro-orm/better-sqlite'
import { projectSubject } from '@shared/permissions/abilities'
import type {
  AddMemberBody,
  CreateProjectBody,
  MemberDto,
  ProjectDetailDto,
  ProjectDto,
} from '@shared/schemas/project.schema'
import { ConflictError, ForbiddenError, NotFoundError } from '../../errors/http-error'
import { accessibleWhere } from '../../http/access'
import type { Actor, AppDeps } from '../../services'
import { audit } from '../audit/audit.service'
import { Dataset, DatasetShare } from '../datasets/dataset.entity'
import { Organization } from '../organizations/organization.entity'
import { User } from '../users/user.entity'
import { findOrInviteUser } from '../users/users.service'
import { Membership, Project, type IProject } from './project.entity'

async function toProjectDtos(
  em: EntityManager,
  actor: Actor,
  projects: IProject[],
): Promise<ProjectDto[]> {
  const ids = projects.map((p) => p.id)
  const orgIds = [
    ...new Set(projects.map((p) => p.organization).filter((id): id is number => id != null)),
  ]
  const [orgs, counts] = await Promise.all([
    orgIds.length ? em.find(Organization, { id: { $in: orgIds } }) : Promise.resolve([]),
    countReadableDatasets(em, actor, ids),
  ])
  const orgName = new Map(orgs.map((o) => [o.id, o.name]))
  const roles = new Map(actor.viewer?.memberships.map((m) => [m.projectId, m.role]))
  return projects.map((p) => ({
    id: p.id,
    name: p.name,
    description: p.description,
    organization:
      p.organization != null
        ? { id: p.organization, name: orgName.get(p.organization) ?? '' }
        : null,
    myRole: roles.get(p.id) ?? null,
    datasetCount: counts.get(p.id) ?? 0,
    createdAt: p.createdAt.toISOString(),
  }))
}

/** Datasets per project that this person may read (a collaborator's count is their shares only). */
async function countReadableDatasets(em: EntityManager, actor: Actor, projectIds: number[]) {
  const counts = new Map<number, number>()
  const allowed = accessibleWhere(actor.ability, 'read', 'Dataset')
  if (!projectIds.length || allowed === null) return counts
  const rows = await em
    .createQueryBuilder(Dataset, 'd')
    .select(['d.project', raw('count(*) as n')])
    .where({ $and: [allowed, { project: { $in: projectIds } }] })
    .groupBy('d.project')
    .execute<{ project: number; n: number }[]>('all')
  for (const r of rows) counts.set(Number(r.project), Number(r.n))
  return counts
}

export async function listProjects(em: EntityManager, actor: Actor): Promise<ProjectDto[]> {
  const where = accessibleWhere<IProject>(actor.ability, 'read', 'Project')
  if (where === null) return []
  return toProjectDtos(em, actor, await em.find(Project, where, { orderBy: { name: 'asc' } }))
}

export async function projectFor(
  em: EntityManager,
  actor: Actor,
  id: number,
  action: 'read' | 'manage_members',
) {
  const project = await em.findOne(Project, { id })
  if (!project || !actor.ability.can('read', projectSubject(id)))
    throw new NotFoundError('project', id)
  if (action !== 'read' && !actor.ability.can(action, projectSubject(id))) {
    throw new ForbiddenError(`Only the owners of "${project.name}" can manage its members.`)
  }
  return project
}

/**
 * The project's members. Sharing one dataset gives the person a collaborator membership (so the
 * project is findable for them), but they are not members of the project: they appear under that
 * dataset's shares instead. Collaborators an owner added by hand, with no share, stay listed.
 */
export async function listMembers(em: EntityManager, projectId: number): Promise<MemberDto[]> {
  const [all, datasets] = await Promise.all([
    em.find(Membership, { project: projectId }, { orderBy: { createdAt: 'asc' } }),
    em.find(Dataset, { project: projectId }, { fields: ['id'] }),
  ])
  const shares = datasets.length
    ? await em.find(DatasetShare, { dataset: { $in: datasets.map((d) => d.id) } })
    : []
  const sharedWith = new Set(shares.map((s) => s.user))
  const memberships = all.filter((m) => m.role !== 'collaborator' || !sharedWith.has(m.user))
  const users = await em.find(User, { id: { $in: memberships.map((m) => m.user) } })
  const byId = new Map(users.map((u) => [u.id, u]))
  return memberships.map((m) => {
    const u = byId.get(m.user)!
    return {
      userId: u.id,
      email: u.email,
      name: u.name,
      role: m.role,
      joinedAt: m.createdAt.toISOString(),
    }
  })
}

export async function getProject(
  em: EntityManager,
  actor: Actor,
  id: number,
): Promise<ProjectDetailDto> {
  const project = await projectFor(em, actor, id, 'read')
  const [dto] = await toProjectDtos(em, actor, [project])
  return { ...dto!, members: await listMembers(em, id) }
}

export async function createProject(
  em: EntityManager,
  actor: Actor,
  input: CreateProjectBody,
): Promise<ProjectDto> {
  if (!actor.user || !actor.ability.can('create', 'Project')) {
    throw new ForbiddenError('Only members of a consortium organization can create projects.')
  }
  const { name, description } = input
  if (await em.count(Project, { name }))
    throw new ConflictError(`A project called "${name}" already exists.`)
  const project = em.create(Project, {
    name,
    description,
    organization: actor.user.organization ?? null,
    createdBy: actor.user.id,
  })
  await em.flush()
  em.create(Membership, { project: project.id, user: actor.user.id, role: 'owner' })
  audit(em, actor, {
    action: 'project.create',
    targetType: 'Project',
    targetId: project.id,
    details: { name },
  })
  await em.flush()
  // The cached viewer is frozen; this request sees its new project through a copy.
  if (actor.viewer)
    actor.viewer = {
      ...actor.viewer,
      memberships: [...actor.viewer.memberships, { projectId: project.id, role: 'owner' }],
    }
  const [dto] = await toProjectDtos(em, actor, [project])
  return dto!
}

export async function addMember(
  em: EntityManager,
  actor: Actor,
  deps: Pick<AppDeps, 'mailer' | 'config'>,
  project: IProject,
  input: AddMemberBody,
): Promise<{ member: MemberDto; created: boolean }> {
  const { email, role } = input
  const { user } = await findOrInviteUser(em, email)
  let membership = await em.findOne(Membership, { project: project.id, user: user.id })
  const created = !membership
  if (membership?.role === 'owner' && role !== 'owner') {
    const owners = await em.count(Membership, { project: project.id, role: 'owner' })
    if (owners <= 1)
      throw new ConflictError('A project needs at least one owner; add another owner first.')
  }
  if (membership) membership.role = role
  else membership = em.create(Membership, { project: project.id, user: user.id, role })
  audit(em, actor, {
    action: 'project.member',
    targetType: 'Project',
    targetId: project.id,
    details: { email, role },
  })
  await em.flush()
  if (created) {
    await deps.mailer.send({
      to: email,
      subject: `You were added to "${project.name}" on Stipple`,
      text: `${actor.user?.name ?? 'A project owner'} added you to the project "${project.name}" as ${role}.\n\n${deps.config.publicUrl}/projects/${project.id}\n`,
    })
  }
  return {
    member: {
      userId: user.id,
      email: user.email,
      name: user.name,
      role,
      joinedAt: membership.createdAt.toISOString(),
    },
    created,
  }
}
