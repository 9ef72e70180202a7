import { LINK_KIND_LABELS, type LinkCheckResult } from '@shared/schemas/link-check.schema'

/**
 * RFC 4180 CSV; a cell that a spreadsheet would read as a formula (=, +, -, @ first) gets a
 * leading apostrophe, since statements are pasted from anywhere.
 */
function cell(value: string | number | boolean | null): string {
  if (value === null) return ''
  let text = String(value)
  if (/^[=+\-@\t\r]/.test(text)) text = `'${text}`
  return /[",\r\n]/.test(text) ? `"${text.replace(/"/g, '""')}"` : text
}

const yesNo = (v: boolean | null) => (v === null ? 'not shown' : v ? 'yes' : 'no')

export function linkCheckCsv(result: LinkCheckResult): string {
  const header = [
    'As written',
    'Kind',
    'Result',
    'Accession',
    'Title',
    'State',
    'Public now',
    'Embargoed until',
    'Reviewer link',
    'Metadata completeness (%)',
    'Required fields filled',
    'Files',
    'Files with checksum',
    'Tables',
    'Quality reports done',
    'Note',
  ]
  const rows = result.items.map((i) => [
    i.input,
    LINK_KIND_LABELS[i.kind],
    i.verdict.replace('_', ' '),
    i.accession,
    i.title,
    i.phase,
    i.publicNow === null ? null : i.publicNow ? 'yes' : 'no',
    i.embargoUntil,
    yesNo(i.reviewerLink),
    i.completeness?.score ?? null,
    i.completeness ? `${i.completeness.requiredFilled}/${i.completeness.requiredTotal}` : null,
    i.files?.total ?? null,
    i.files?.withChecksum ?? null,
    i.qualityReports?.tables ?? null,
    i.qualityReports?.done ?? null,
    i.note,
  ])
  return [header, ...rows].map((r) => r.map(cell).join(',')).join('\r\n') + '\r\n'
}
