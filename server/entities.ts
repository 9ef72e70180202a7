import { AuditEvent } from './modules/audit/audit-event.entity'
import { Sequence } from './modules/common/sequence.entity'
import { Dataset, DatasetShare } from './modules/datasets/dataset.entity'
import { Organization } from './modules/organizations/organization.entity'
import { Membership, Project } from './modules/projects/project.entity'
import { Session } from './modules/sessions/session.entity'
import { ApiToken } from './modules/tokens/api-token.entity'
import { User } from './modules/users/user.entity'

/** Every entity, listed explicitly (no folder scanning), for the server, the CLI and the tests. */
export const entities = [
  Organization,
  User,
  Project,
  Membership,
  Dataset,
  DatasetShare,
  ApiToken,
  AuditEvent,
  Session,
  Sequence,
]
