/** Site-wide roles. A user without one is an ordinary signed-in person. */
export const SITE_ROLES = ['admin', 'steward', 'editor'] as const
export type SiteRole = (typeof SITE_ROLES)[number]

/** Roles a user can hold in one project. Collaborators see only datasets shared with them. */
export const PROJECT_ROLES = ['owner', 'member', 'collaborator'] as const
export type ProjectRole = (typeof PROJECT_ROLES)[number]

/** What a dataset share can grant beyond reading the metadata. */
export const SHARE_CAPABILITIES = ['preview', 'annotate', 'download'] as const
export type ShareCapability = (typeof SHARE_CAPABILITIES)[number]

export const SITE_ROLE_LABELS: Record<SiteRole, string> = {
  admin: 'Site admin',
  steward: 'Data steward',
  editor: 'Journal editor',
}

export const PROJECT_ROLE_LABELS: Record<ProjectRole, string> = {
  owner: 'Owner',
  member: 'Member',
  collaborator: 'Collaborator',
}
