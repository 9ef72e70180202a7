import type { ProjectRole, ShareCapability, SiteRole } from '../domain/roles'

/**
 * Everything the abilities need to know about the person asking. The server builds it from the
 * database for every request; the client receives the same object from GET /api/me.
 */
export interface Viewer {
  id: number
  siteRole: SiteRole | null
  /** Consortium members belong to an organization (lab or institute); external people do not. */
  organizationId: number | null
  memberships: { projectId: number; role: ProjectRole }[]
  shares: { datasetId: number; capabilities: ShareCapability[] }[]
}
