import { ACCESS_PHASES, ACCESS_PHASE_LABELS } from '../domain/dataset-state'
import {
  DATASET_ACTIONS,
  DATASET_ACTION_LABELS,
  PROJECT_ACTIONS,
  PROJECT_ACTION_LABELS,
} from './actions'
import { DATASET_MATRIX, MATRIX_ROLES, MATRIX_ROLE_LABELS, PROJECT_MATRIX } from './matrix'

const YES = '✓'
const NO = '·'

/** shared/permissions/PERMISSIONS.md, rendered from the matrix the abilities are built from. */
export function renderPermissionsMarkdown(): string {
  const out: string[] = [
    '# Who may do what',
    '',
    '<!-- Generated from shared/permissions/matrix.ts by `npm run docs:permissions`; do not edit by hand. -->',
    '',
    'Stipple decides every request with one set of CASL abilities, built from the matrix in',
    '`shared/permissions/matrix.ts` and shared by the server (which also turns them into database',
    'filters for lists) and the client (which hides what you cannot do).',
    '`tests/api/permission-matrix.test.ts` checks every cell below against the HTTP API.',
    '',
    `${YES} allowed, ${NO} not allowed. Someone who may not read a dataset gets 404 for it (its existence`,
    'does not leak); someone who may read it but not do the action gets 403; signed-out requests to',
    'actions that need an account get 401.',
    '',
    'A collaborator row shows the most a share can grant: reading comes with every share, and each',
    'of previews, annotation and download only when the share names it.',
    '',
  ]
  for (const action of DATASET_ACTIONS) {
    out.push(`## ${DATASET_ACTION_LABELS[action]} (\`${action}\`)`, '')
    out.push(`| role | ${ACCESS_PHASES.map((p) => ACCESS_PHASE_LABELS[p]).join(' | ')} |`)
    out.push(`| --- | ${ACCESS_PHASES.map(() => ':-:').join(' | ')} |`)
    for (const role of MATRIX_ROLES) {
      const cells = ACCESS_PHASES.map((p) => (DATASET_MATRIX[role][action].includes(p) ? YES : NO))
      out.push(`| ${MATRIX_ROLE_LABELS[role]} | ${cells.join(' | ')} |`)
    }
    out.push('')
  }
  out.push('## Projects', '')
  out.push(`| role | ${PROJECT_ACTIONS.map((a) => PROJECT_ACTION_LABELS[a]).join(' | ')} |`)
  out.push(`| --- | ${PROJECT_ACTIONS.map(() => ':-:').join(' | ')} |`)
  for (const role of MATRIX_ROLES) {
    out.push(
      `| ${MATRIX_ROLE_LABELS[role]} | ${PROJECT_ACTIONS.map((a) => (PROJECT_MATRIX[role][a] ? YES : NO)).join(' | ')} |`,
    )
  }
  out.push(
    '',
    'Creating a project needs membership of a consortium organization (or the site admin role).',
    '',
  )
  return out.join('\n')
}
