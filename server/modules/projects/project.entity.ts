import { defineEntity, p, type InferEntity } from '@mikro-orm/core'
import type { ProjectRole } from '@shared/domain/roles'
import { Organization } from '../organizations/organization.entity'
import { User } from '../users/user.entity'

export const Project = defineEntity({
  name: 'Project',
  properties: {
    id: p.integer().primary(),
    name: p.string().unique(),
    description: p.text().default(''),
    organization: p.manyToOne(Organization).mapToPk().nullable(),
    createdBy: p.manyToOne(User).mapToPk().nullable(),
    createdAt: p.datetime().onCreate(() => new Date()),
  },
})
export type IProject = InferEntity<typeof Project>

export const Membership = defineEntity({
  name: 'Membership',
  uniques: [{ properties: ['project', 'user'] }],
  properties: {
    id: p.integer().primary(),
    project: p.manyToOne(Project).mapToPk().deleteRule('cascade'),
    user: p.manyToOne(User).mapToPk().index(),
    role: p.string().$type<ProjectRole>(),
    createdAt: p.datetime().onCreate(() => new Date()),
  },
})
export type IMembership = InferEntity<typeof Membership>
