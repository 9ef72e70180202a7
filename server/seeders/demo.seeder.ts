import { readFileSync } from 'node:fs'
import { join } from 'node:path'
import type { EntityManager } from '@mikro-orm/better-sqlite'
import { z } from 'zod'
import { DATASET_STATES, formatAccession } from '@shared/domain/dataset-state'
import { PROJECT_ROLES, SHARE_CAPABILITIES, SITE_ROLES, type SiteRole } from '@shared/domain/roles'
import { metadataSchema } from '@shared/metadata/metadata.schema'
import { licenceSchema } from '@shared/schemas/dataset.schema'
import { nextSequenceValue } from '../modules/common/sequence.service'
import { Dataset, DatasetShare } from '../modules/datasets/dataset.entity'
import { loadAccounts } from '../modules/idp/accounts'
import { DatasetMetadata } from '../modules/metadata/dataset-metadata.entity'
import { Organization } from '../modules/organizations/organization.entity'
import { Membership, Project } from '../modules/projects/project.entity'
import { User } from '../modules/users/user.entity'
import { seedEmbargoDemo } from './embargo-demo.seeder'
import { seedDemoCuration } from './demo-curation'

const consortiumSchema = z.object({
  organizations: z.array(
    z.object({ name: z.string(), kind: z.enum(['lab', 'institute']), emailDomain: z.string() }),
  ),
  projects: z.array(
    z.object({
      name: z.string(),
      description: z.string(),
      organization: z.string(),
      members: z.array(z.object({ email: z.string(), role: z.enum(PROJECT_ROLES) })),
    }),
  ),
  datasets: z.array(
    z.object({
      project: z.string(),
      title: z.string(),
      description: z.string(),
      createdBy: z.string(),
      state: z.enum(DATASET_STATES),
      licence: licenceSchema,
      embargoDays: z.number().int().positive().optional(),
      proposedEmbargoDays: z.number().int().positive().optional(),
      shares: z
        .array(z.object({ email: z.string(), capabilities: z.array(z.enum(SHARE_CAPABILITIES)) }))
        .optional(),
      /** The description (metadata document); datasets past submission carry a complete one. */
      metadata: metadataSchema.optional(),
    }),
  ),
})

const DAY = 86_400_000
const startOfDayUtc = (t: number) => new Date(Math.floor(t / DAY) * DAY)

/**
 * Seeds the invented demo consortium from demo-data/. Every record is found by its natural key
 * first, so running it again changes nothing.
 */
export async function seedDemo(
  em: EntityManager,
  demoDir: string,
  now = new Date(),
): Promise<{ created: number }> {
  const consortium = consortiumSchema.parse(
    JSON.parse(readFileSync(join(demoDir, 'consortium.json'), 'utf8')),
  )
  const accounts = loadAccounts(join(demoDir, 'accounts.json'))
  let created = 0

  const orgs = new Map<string, number>()
  for (const o of consortium.organizations) {
    let org = await em.findOne(Organization, { name: o.name })
    if (!org) {
      org = em.create(Organization, o)
      created++
    }
    await em.flush()
    orgs.set(o.name, org.id)
  }
  const orgByDomain = new Map(
    consortium.organizations.map((o) => [o.emailDomain, orgs.get(o.name)!]),
  )

  const users = new Map<string, number>()
  for (const a of accounts) {
    let user = await em.findOne(User, { email: a.email })
    if (!user) {
      const siteRole = (SITE_ROLES as readonly string[]).includes(a.role)
        ? (a.role as SiteRole)
        : null
      const domain = a.email.slice(a.email.indexOf('@') + 1)
      user = em.create(User, {
        email: a.email,
        name: a.name,
        subject: a.sub,
        siteRole,
        organization: orgByDomain.get(domain) ?? null,
      })
      created++
    }
    await em.flush()
    users.set(a.email, user.id)
  }
  const userId = (email: string) => {
    const id = users.get(email)
    if (id === undefined) throw new Error(`demo-data: ${email} is not in accounts.json`)
    return id
  }

  const projects = new Map<string, number>()
  for (const p of consortium.projects) {
    let project = await em.findOne(Project, { name: p.name })
    if (!project) {
      const owner = p.members.find((m) => m.role === 'owner')
      project = em.create(Project, {
        name: p.name,
        description: p.description,
        organization: orgs.get(p.organization) ?? null,
        createdBy: owner ? userId(owner.email) : null,
      })
      created++
    }
    await em.flush()
    projects.set(p.name, project.id)
    for (const m of p.members) {
      if (!(await em.findOne(Membership, { project: project.id, user: userId(m.email) }))) {
        em.create(Membership, { project: project.id, user: userId(m.email), role: m.role })
        created++
      }
    }
    await em.flush()
  }

  for (const d of consortium.datasets) {
    const projectId = projects.get(d.project)!
    if (await em.findOne(Dataset, { project: projectId, title: d.title })) continue
    const approved = d.state === 'approved' || d.state === 'withdrawn'
    const submitted = approved || d.state === 'submitted' || d.state === 'changes_requested'
    const dataset = em.create(Dataset, {
      accession: formatAccession(await nextSequenceValue(em, 'accession')),
      project: projectId,
      title: d.title,
      description: d.description,
      state: d.state,
      licence: d.licence,
      createdBy: userId(d.createdBy),
      embargoUntil: d.embargoDays ? startOfDayUtc(now.getTime() + d.embargoDays * DAY) : null,
      proposedEmbargoUntil: d.proposedEmbargoDays
        ? startOfDayUtc(now.getTime() + d.proposedEmbargoDays * DAY)
        : null,
      submittedAt: submitted ? now : null,
      approvedAt: approved ? now : null,
    })
    created++
    await em.flush()
    if (d.metadata)
      em.create(DatasetMetadata, {
        dataset: dataset.id,
        document: d.metadata,
        updatedBy: userId(d.createdBy),
      })
    for (const s of d.shares ?? []) {
      const user = userId(s.email)
      em.create(DatasetShare, {
        dataset: dataset.id,
        user,
        capabilities: s.capabilities,
        createdBy: userId(d.createdBy),
      })
      if (!(await em.findOne(Membership, { project: projectId, user }))) {
        em.create(Membership, { project: projectId, user, role: 'collaborator' })
      }
    }
    await em.flush()
  }
  created += await seedEmbargoDemo(em, now)
  created += await seedDemoCuration(em, now)
  return { created }
}
