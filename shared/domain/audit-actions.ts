/**
 * Every action the audit trail records, with the words a steward reads. Server code writes only
 * these names (the audit service's type says so); the log page and the CSV export show the labels.
 */
export const AUDIT_ACTION_LABELS = {
  'user.sign_in': 'Signed in',
  'user.sign_out': 'Signed out',
  'user.add': 'Added a user',
  'user.update': 'Updated a user',
  'user.role': 'Changed a site role',
  'user.deactivate': 'Deactivated a user',
  'user.reactivate': 'Reactivated a user',
  'token.create': 'Created an API token',
  'token.revoke': 'Revoked an API token',
  'project.create': 'Created a project',
  'project.member': 'Set a project member',
  'instrument.create': 'Saved an instrument description',
  'dataset.create': 'Created a dataset',
  'dataset.update': 'Edited dataset details',
  'dataset.metadata': 'Edited the description (one editing session)',
  'dataset.delete': 'Deleted a dataset',
  'dataset.submit': 'Submitted for curation',
  'dataset.approve': 'Approved',
  'dataset.request_changes': 'Requested changes',
  'dataset.withdraw': 'Withdrew',
  'dataset.embargo': 'Changed the embargo',
  'dataset.release': 'Released (embargo ended)',
  'dataset.version': 'Froze a version',
  'dataset.revise': 'Started a new version',
  'dataset.share': 'Shared',
  'dataset.share.update': 'Changed a share',
  'dataset.unshare': 'Revoked a share',
  'dataset.download': 'Downloaded all files (zip)',
  'dataset.comment': 'Commented',
  'file.upload': 'Uploaded a file',
  'file.delete': 'Deleted a file',
  'file.download': 'Downloaded a file',
  'file.mapping': 'Changed a table’s column mapping',
  'file.format': 'Changed a table’s format',
  'upload.expire': 'Abandoned upload removed',
  'doi.register': 'Registered a DOI',
  'doi.fail': 'DOI registration failed',
  'doi.retry': 'Retried a DOI registration',
  'reviewer_link.create': 'Created a reviewer link',
  'reviewer_link.revoke': 'Revoked a reviewer link',
  'reviewer_link.use': 'Reviewer link opened',
  'manuscript.create': 'Created a manuscript record',
  'manuscript.attach': 'Attached a dataset to a manuscript',
  'manuscript.detach': 'Detached a dataset from a manuscript',
  'link_check.run': 'Ran a link check',
  'region.create': 'Drew a region',
  'region.update': 'Changed a region',
  'region.delete': 'Deleted a region',
  'comment.create': 'Commented on a region',
  'comment.update': 'Edited a comment',
  'comment.resolve': 'Resolved a thread',
} as const

export type AuditAction = keyof typeof AUDIT_ACTION_LABELS
export const AUDIT_ACTIONS = Object.keys(AUDIT_ACTION_LABELS) as AuditAction[]

export const isAuditAction = (value: string): value is AuditAction =>
  Object.hasOwn(AUDIT_ACTION_LABELS, value)

/** The label of a recorded action; names no longer in the list (older rows) read as they are. */
export const auditActionLabel = (action: string): string =>
  isAuditAction(action) ? AUDIT_ACTION_LABELS[action] : action

/** Words for the detail keys services record; unknown keys keep their own name. */
const DETAIL_LABELS: Record<string, string> = {
  reason: 'reason',
  from: 'from',
  to: 'to',
  comment: 'comment',
  embargoUntil: 'embargo until',
  with: 'with',
  capabilities: 'can',
  file: 'file',
  files: 'files',
  size: 'size',
  sha256: 'SHA-256',
  kind: 'kind',
  range: 'byte range',
  role: 'role',
  email: 'e-mail',
  title: 'title',
  fields: 'fields',
  siteRole: 'site role',
  by: 'by',
  for: 'for',
  user: 'user',
  saves: 'saves',
  scheduledFor: 'embargo end',
}

/** Dates in details are whole ISO instants; a day at 00:00 UTC reads as the day alone. */
function detailValue(value: unknown): string {
  if (value === null || value === undefined) return 'none'
  if (Array.isArray(value)) return value.length ? value.map(detailValue).join(', ') : 'none'
  if (typeof value === 'string') {
    if (/^\d{4}-\d{2}-\d{2}T00:00:00(\.000)?Z$/.test(value)) return `${value.slice(0, 10)} (UTC)`
    if (/^\d{4}-\d{2}-\d{2}T[\d:.]+Z$/.test(value))
      return `${value.slice(0, 16).replace('T', ' ')} UTC`
    return value
  }
  if (typeof value === 'object') return JSON.stringify(value)
  return String(value)
}

/**
 * An event's details in words ("reason: …; from: 2027-01-01 (UTC); to: none"), for the log page
 * and the CSV; `names` turns user ids recorded in details into names.
 */
export function describeAuditDetails(
  details: Record<string, unknown> | null,
  names: (userId: number) => string | undefined = () => undefined,
): string {
  if (!details) return ''
  return Object.entries(details)
    .map(([key, value]) => {
      const label = DETAIL_LABELS[key] ?? key
      const shown =
        key === 'user' && typeof value === 'number'
          ? (names(value) ?? `user ${value}`)
          : detailValue(value)
      return `${label}: ${shown}`
    })
    .join('; ')
}
