import { z } from 'zod'
import { PROJECT_ROLES } from '../domain/roles'
import { emailSchema, textField } from './common.schema'

export const createProjectSchema = z
  .object({
    name: textField('Name', 120, 3),
    description: z
      .string()
      .trim()
      .max(4000, 'Description can have at most 4000 characters')
      .default(''),
  })
  .meta({ id: 'CreateProject' })
export type CreateProjectInput = z.input<typeof createProjectSchema>
export type CreateProjectBody = z.output<typeof createProjectSchema>

export const addMemberSchema = z
  .object({
    email: emailSchema,
    role: z.enum(PROJECT_ROLES, { error: `Role must be one of ${PROJECT_ROLES.join(', ')}` }),
  })
  .meta({ id: 'AddMember' })
export type AddMemberInput = z.input<typeof addMemberSchema>
export type AddMemberBody = z.output<typeof addMemberSchema>

export const memberSchema = z
  .object({
    userId: z.number(),
    email: z.string(),
    name: z.string(),
    role: z.enum(PROJECT_ROLES),
    joinedAt: z.string(),
  })
  .meta({ id: 'Member' })
export type MemberDto = z.infer<typeof memberSchema>

export const projectSchema = z
  .object({
    id: z.number(),
    name: z.string(),
    description: z.string(),
    organization: z.object({ id: z.number(), name: z.string() }).nullable(),
    myRole: z.enum(PROJECT_ROLES).nullable(),
    datasetCount: z.number(),
    createdAt: z.string(),
  })
  .meta({ id: 'Project' })
export type ProjectDto = z.infer<typeof projectSchema>

export const projectDetailSchema = projectSchema
  .extend({ members: z.array(memberSchema) })
  .meta({ id: 'ProjectDetail' })
export type ProjectDetailDto = z.infer<typeof projectDetailSchema>
