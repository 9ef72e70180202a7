import type { EntityManager } from '@mikro-orm/better-sqlite'
import type { Viewer } from '@shared/permissions/viewer'
import { DatasetShare } from '../datasets/dataset.entity'
import { Membership } from '../projects/project.entity'
import type { IUser } from './user.entity'
import { manuscriptDatasetsOf } from '../manuscripts/journal-editors'

/** Loads what the abilities need about a user: small indexed queries. */
export async function loadViewer(em: EntityManager, user: IUser): Promise<Viewer> {
  const [memberships, shares, manuscriptDatasets] = await Promise.all([
    em.find(
      Membership,
      { user: user.id },
      { fields: ['project', 'role'], disableIdentityMap: true },
    ),
    em.find(
      DatasetShare,
      { user: user.id },
      { fields: ['dataset', 'capabilities'], disableIdentityMap: true },
    ),
    user.siteRole === 'editor' ? manuscriptDatasetsOf(em, user.id) : Promise.resolve([]),
  ])
  return {
    id: user.id,
    siteRole: user.siteRole ?? null,
    organizationId: user.organization ?? null,
    memberships: memberships.map((m) => ({ projectId: m.project, role: m.role })),
    shares: shares.map((s) => ({ datasetId: s.dataset, capabilities: s.capabilities })),
    manuscriptDatasets,
  }
}
