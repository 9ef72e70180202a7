import {
  mdiAlertCircleOutline,
  mdiCheckCircleOutline,
  mdiProgressClock,
  mdiProgressUpload,
  mdiTableEdit,
} from '@mdi/js'
import type { FileKind, FileStatus } from '@shared/domain/files'

export const KIND_LABELS: Record<FileKind, string> = {
  localization_table: 'Localization table',
  raw_stack: 'Raw camera stack',
  metadata: 'Metadata',
  other: 'Other',
}

/** Each status in words, with an icon and a colour that only repeat what the words say. */
export const STATUS_LOOK: Record<FileStatus, { label: string; icon: string; color: string }> = {
  uploading: { label: 'Uploading', icon: mdiProgressUpload, color: 'info' },
  processing: { label: 'Processing', icon: mdiProgressClock, color: 'info' },
  needs_mapping: { label: 'Needs column mapping', icon: mdiTableEdit, color: 'warning' },
  ready: { label: 'Ready', icon: mdiCheckCircleOutline, color: 'success' },
  rejected: { label: 'Rejected', icon: mdiAlertCircleOutline, color: 'error' },
}

/** The first and last characters of a SHA-256, enough to compare by eye. */
export const shortHash = (sha256: string) => `${sha256.slice(0, 8)}…${sha256.slice(-4)}`
