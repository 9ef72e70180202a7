import type { ProjectRole, ShareCapability, SiteRole } from '../domain/roles'

/**
 * Everything the abilities need to know about the person asking. The server builds it from the
 * database and caches it frozen per access version, so it is never changed in place; the client
 * receives the same facts from GET /api/me.
 */
export interface Viewer {
  readonly id: number
  readonly siteRole: SiteRole | null
  /** Consortium members belong to an organization (lab or institute); external people do not. */
  readonly organizationId: number | null
  readonly memberships: readonly { readonly projectId: number; readonly role: ProjectRole }[]
  readonly shares: readonly {
    readonly datasetId: number
    readonly capabilities: readonly ShareCapability[]
  }[]
  /**
   * Datasets attached to a manuscript of a journal this person edits. They count only while the
   * person is a journal editor (site role); losing the role closes them at once.
   */
  readonly manuscriptDatasets?: readonly number[]
}
