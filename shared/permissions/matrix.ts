import { ACCESS_PHASES, type AccessPhase } from '../domain/dataset-state'
import type { DatasetAction, ProjectAction } from './actions'

/**
 * The permission matrix, written once. The CASL abilities are built from it, shared/permissions/PERMISSIONS.md is
 * rendered from it, and tests/api/permission-matrix.test.ts checks every cell against the HTTP API.
 *
 * Rows are the ways a person can stand towards a dataset. A cell lists the access phases (state, and
 * for approved datasets whether the embargo has ended) in which the action is allowed.
 */
export const MATRIX_ROLES = [
  'admin',
  'steward',
  'editor',
  'owner',
  'member',
  'collaborator',
  'reviewer',
  'outsider',
  'public',
] as const
export type MatrixRole = (typeof MATRIX_ROLES)[number]

export const MATRIX_ROLE_LABELS: Record<MatrixRole, string> = {
  admin: 'Site admin',
  steward: 'Data steward (site-wide)',
  editor: 'Journal editor (dataset attached to a manuscript of their journal)',
  owner: 'Project owner',
  member: 'Project member (depositor)',
  collaborator: 'Collaborator (dataset shared with them)',
  reviewer: 'Reviewer (holding a live reviewer link to the dataset)',
  outsider: 'Signed in, no relation to the dataset',
  public: 'Public (signed out)',
}

const ALL: readonly AccessPhase[] = ACCESS_PHASES
const NONE: readonly AccessPhase[] = []
const NOT_WITHDRAWN: readonly AccessPhase[] = ALL.filter((p) => p !== 'withdrawn')
const EDITABLE: readonly AccessPhase[] = ['draft', 'changes_requested']
const VISIBLE_TO_EDITORS: readonly AccessPhase[] = [
  'submitted',
  'changes_requested',
  'embargoed',
  'released',
  'withdrawn',
]
/**
 * What a reviewer link (and a journal editor, for a dataset attached to a manuscript of their
 * journal) opens: the dataset from submission on, until it is withdrawn. Drafts are never shown
 * to a journal: links to drafts are refused and editors do not see them.
 */
const UNDER_REVIEW: readonly AccessPhase[] = [
  'submitted',
  'changes_requested',
  'embargoed',
  'released',
]
/** Embargoed datasets keep a public landing page (metadata), as DOI metadata are public; files stay closed. */
const PUBLIC_METADATA: readonly AccessPhase[] = ['embargoed', 'released', 'withdrawn']
const RELEASED: readonly AccessPhase[] = ['released']

type DatasetRow = Record<DatasetAction, readonly AccessPhase[]>

const depositorRow = (share: readonly AccessPhase[]): DatasetRow => ({
  read: ALL,
  preview: ALL,
  annotate: NOT_WITHDRAWN,
  download: ALL,
  edit: EDITABLE,
  delete: ['draft'],
  submit: EDITABLE,
  curate: NONE,
  embargo: NONE,
  share,
  reviewer_link: NONE,
})

const publicRow: DatasetRow = {
  read: PUBLIC_METADATA,
  preview: RELEASED,
  annotate: NONE,
  download: RELEASED,
  edit: NONE,
  delete: NONE,
  submit: NONE,
  curate: NONE,
  embargo: NONE,
  share: NONE,
  reviewer_link: NONE,
}

const stewardRow: DatasetRow = {
  read: ALL,
  preview: ALL,
  annotate: NOT_WITHDRAWN,
  download: ALL,
  edit: NONE,
  delete: NONE,
  submit: NONE,
  curate: ['submitted', 'embargoed', 'released'],
  embargo: ['submitted', 'embargoed'],
  share: NONE,
  reviewer_link: NONE,
}

export const DATASET_MATRIX: Record<MatrixRole, DatasetRow> = {
  admin: { ...stewardRow, delete: ['draft', 'withdrawn'] },
  steward: stewardRow,
  /**
   * Only for datasets attached to a manuscript of the editor's journal (any other dataset: as an
   * outsider). Editors check the data behind a manuscript, so they see what its reviewers see,
   * and hand out the reviewer links.
   */
  editor: {
    ...publicRow,
    read: VISIBLE_TO_EDITORS,
    preview: UNDER_REVIEW,
    download: UNDER_REVIEW,
    reviewer_link: UNDER_REVIEW,
  },
  owner: { ...depositorRow(NOT_WITHDRAWN), reviewer_link: UNDER_REVIEW },
  member: depositorRow(NOT_WITHDRAWN),
  /** The most a share can grant; each share narrows it to the capabilities it names. */
  collaborator: {
    ...publicRow,
    read: ALL,
    preview: NOT_WITHDRAWN,
    annotate: NOT_WITHDRAWN,
    download: NOT_WITHDRAWN,
  },
  /** View, preview and download of the one dataset the link names; nothing else. */
  reviewer: {
    ...publicRow,
    read: [...UNDER_REVIEW, 'withdrawn'],
    preview: UNDER_REVIEW,
    download: UNDER_REVIEW,
  },
  outsider: publicRow,
  public: publicRow,
}

export const PROJECT_MATRIX: Record<MatrixRole, Record<ProjectAction, boolean>> = {
  admin: { read: true, create_dataset: true, manage_members: true },
  steward: { read: true, create_dataset: false, manage_members: false },
  editor: { read: false, create_dataset: false, manage_members: false },
  owner: { read: true, create_dataset: true, manage_members: true },
  member: { read: true, create_dataset: true, manage_members: false },
  collaborator: { read: true, create_dataset: false, manage_members: false },
  reviewer: { read: false, create_dataset: false, manage_members: false },
  outsider: { read: false, create_dataset: false, manage_members: false },
  public: { read: false, create_dataset: false, manage_members: false },
}

export function datasetCell(role: MatrixRole, action: DatasetAction, phase: AccessPhase): boolean {
  return DATASET_MATRIX[role][action].includes(phase)
}
