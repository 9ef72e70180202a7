import { Job } from './jobs/job.entity'
import { AuditEvent } from './modules/audit/audit-event.entity'
import { Comment, CommentMention } from './modules/comments/comment.entity'
import { Region } from './modules/regions/region.entity'
import { Sequence } from './modules/common/sequence.entity'
import { Dataset, DatasetShare } from './modules/datasets/dataset.entity'
import { EmbargoNotice } from './modules/embargo/embargo-notice.entity'
import { DatasetFile } from './modules/files/dataset-file.entity'
import { DatasetMetadata, InstrumentProfile } from './modules/metadata/dataset-metadata.entity'
import { OidcPayload } from './modules/idp/oidc-payload.entity'
import { Organization } from './modules/organizations/organization.entity'
import { Membership, Project } from './modules/projects/project.entity'
import { QualityReport } from './modules/quality/quality-report.entity'
import { Session } from './modules/sessions/session.entity'
import { ApiToken } from './modules/tokens/api-token.entity'
import { UploadReservation } from './modules/uploads/upload-reservation.entity'
import { User } from './modules/users/user.entity'
import { CurationEntry } from './modules/curation/curation-entry.entity'
import { DatasetVersion, VersionBlob, VersionFile } from './modules/versions/dataset-version.entity'
import {
  Journal,
  JournalEditor,
  Manuscript,
  ManuscriptDataset,
} from './modules/manuscripts/manuscript.entity'
import { ReviewerLink } from './modules/reviewer-links/reviewer-link.entity'

/** Every entity, listed explicitly (no folder scanning), for the server, the CLI and the tests. */
export const entities = [
  Organization,
  User,
  Project,
  Membership,
  Dataset,
  DatasetShare,
  DatasetFile,
  QualityReport,
  Region,
  Comment,
  CommentMention,
  DatasetMetadata,
  InstrumentProfile,
  Job,
  UploadReservation,
  ApiToken,
  AuditEvent,
  EmbargoNotice,
  Session,
  OidcPayload,
  Sequence,
  CurationEntry,
  DatasetVersion,
  VersionBlob,
  VersionFile,
  Journal,
  JournalEditor,
  Manuscript,
  ManuscriptDataset,
  ReviewerLink,
]

// Enumerated columns are plain text typed with $type<…>(): MikroORM 6.6's SQLite schema reader
// misreads CHECK constraints of three or more values, so every schema diff would rebuild those
// tables. The allowed values are enforced by the shared zod schemas and the TypeScript types.
