import { z } from 'zod'
import { PROJECT_ROLES, SHARE_CAPABILITIES, SITE_ROLES } from '../domain/roles'

export const viewerSchema = z.object({
  id: z.number(),
  siteRole: z.enum(SITE_ROLES).nullable(),
  organizationId: z.number().nullable(),
  memberships: z.array(z.object({ projectId: z.number(), role: z.enum(PROJECT_ROLES) })),
  shares: z.array(
    z.object({ datasetId: z.number(), capabilities: z.array(z.enum(SHARE_CAPABILITIES)) }),
  ),
  manuscriptDatasets: z.array(z.number()).optional(),
})

export const meSchema = z
  .object({
    user: z
      .object({
        id: z.number(),
        email: z.string(),
        name: z.string(),
        siteRole: z.enum(SITE_ROLES).nullable(),
        organization: z.object({ id: z.number(), name: z.string() }).nullable(),
      })
      .nullable(),
    /** What the abilities are built from; null when signed out. */
    viewer: viewerSchema.nullable(),
    /** Datasets this browser sees through live reviewer links (their reviewer rows apply). */
    reviewing: z.array(z.number()).optional(),
    demo: z.boolean(),
  })
  .meta({ id: 'Me' })
export type MeDto = z.infer<typeof meSchema>
