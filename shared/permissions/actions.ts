/** Actions on a dataset, in the order the permission matrix lists them. */
export const DATASET_ACTIONS = [
  'read',
  'preview',
  'annotate',
  'download',
  'edit',
  'delete',
  'submit',
  'curate',
  'embargo',
  'share',
  'reviewer_link',
] as const
export type DatasetAction = (typeof DATASET_ACTIONS)[number]

export const DATASET_ACTION_LABELS: Record<DatasetAction, string> = {
  read: 'Read metadata',
  preview: 'View previews and quality report',
  annotate: 'Annotate (regions of interest, comments)',
  download: 'Download files',
  edit: 'Edit metadata and files',
  delete: 'Delete',
  submit: 'Submit for curation',
  curate: 'Curate (approve, request changes, withdraw)',
  embargo: 'Set, extend or lift the embargo',
  share: 'Share with collaborators, attach to a manuscript',
  reviewer_link: 'Create and revoke reviewer links',
}

/** Actions on a project. */
export const PROJECT_ACTIONS = ['read', 'create_dataset', 'manage_members'] as const
export type ProjectAction = (typeof PROJECT_ACTIONS)[number]

export const PROJECT_ACTION_LABELS: Record<ProjectAction, string> = {
  read: 'See the project and its member list',
  create_dataset: 'Create datasets in the project',
  manage_members: 'Manage members',
}

/** Every action the ability knows; `create` and `manage` cover the administrative subjects. */
export type AppAction = DatasetAction | ProjectAction | 'create' | 'manage'
