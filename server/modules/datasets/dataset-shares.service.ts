import type { EntityManager } from '@mikro-orm/better-sqlite'
import type { DatasetShareDto, ShareDatasetBody } from '@shared/schemas/dataset.schema'
import { ConflictError, NotFoundError } from '../../errors/http-error'
import type { Actor, AppDeps } from '../../services'
import { audit } from '../audit/audit.service'
import { Membership } from '../projects/project.entity'
import { User, type IUser } from '../users/user.entity'
import { findOrInviteUser } from '../users/users.service'
import { DatasetShare, type IDataset, type IDatasetShare } from './dataset.entity'

/** Nobody has signed in with this address yet: the person exists only as an invitation. */
const invitationOpen = (user: IUser) => user.subject == null && user.lastSignInAt == null

function toShareDto(share: IDatasetShare, user: IUser): DatasetShareDto {
  const open = invitationOpen(user)
  return {
    id: share.id,
    userId: user.id,
    email: user.email,
    name: open ? '' : user.name,
    invitationOpen: open,
    capabilities: share.capabilities,
    createdAt: share.createdAt.toISOString(),
  }
}

export async function listShares(em: EntityManager, dataset: IDataset): Promise<DatasetShareDto[]> {
  const shares = await em.find(
    DatasetShare,
    { dataset: dataset.id },
    { orderBy: { createdAt: 'asc' } },
  )
  const users = await em.find(User, { id: { $in: shares.map((s) => s.user) } })
  const byId = new Map(users.map((u) => [u.id, u]))
  return shares.map((s) => toShareDto(s, byId.get(s.user)!))
}

/**
 * The e-mail a share sends. Someone who has never signed in gets an invitation that says so: no
 * account exists yet, and signing in with this address (through the consortium's sign-in) is
 * what opens the dataset to them.
 */
function shareMail(
  actor: Actor,
  deps: Pick<AppDeps, 'config'>,
  dataset: IDataset,
  { email, capabilities, message }: ShareDatasetBody,
  invitation: boolean,
) {
  const who = actor.user?.name ?? 'A Stipple user'
  const can = capabilities.length
    ? `read its description and ${capabilities.join(', ')}`
    : 'read its description'
  const link = `${deps.config.publicUrl}/datasets/${dataset.accession}`
  const note = message ? `\nTheir message:\n${message}\n` : ''
  if (invitation)
    return {
      to: email,
      subject: `${who} invites you to Stipple to see ${dataset.accession}`,
      text: [
        `${who} invited you to the dataset ${dataset.accession} "${dataset.title}" on Stipple, the consortium's data hub.`,
        `You have no Stipple account yet. Sign in once with this address (${email}) and you can ${can}.`,
        note,
        `Accept the invitation by signing in here:`,
        link,
        '',
        'If you did not expect this, ignore this message; nothing is shared until you sign in.',
      ].join('\n'),
    }
  return {
    to: email,
    subject: `${who} shared ${dataset.accession} with you on Stipple`,
    text: [
      `${who} shared the dataset ${dataset.accession} "${dataset.title}" with you.`,
      `You can ${can}.`,
      note,
      `Open it here (sign in with ${email}):`,
      link,
    ].join('\n'),
  }
}

/**
 * Shares a dataset with one person (inviting them by e-mail if they have never signed in), makes
 * them a collaborator of the project so they can find it, and tells them by e-mail.
 */
export async function shareDataset(
  em: EntityManager,
  actor: Actor,
  deps: Pick<AppDeps, 'mailer' | 'config'>,
  dataset: IDataset,
  input: ShareDatasetBody,
): Promise<{ share: DatasetShareDto; created: boolean }> {
  const { email, capabilities } = input
  const { user } = await findOrInviteUser(em, email)
  const membership = await em.findOne(Membership, { project: dataset.project, user: user.id })
  if (membership && membership.role !== 'collaborator') {
    throw new ConflictError(
      `${email} is already a ${membership.role} of this project and sees all its datasets.`,
    )
  }
  if (!membership)
    em.create(Membership, { project: dataset.project, user: user.id, role: 'collaborator' })

  let share = await em.findOne(DatasetShare, { dataset: dataset.id, user: user.id })
  const created = !share
  if (share) share.capabilities = capabilities
  else
    share = em.create(DatasetShare, {
      dataset: dataset.id,
      user: user.id,
      capabilities,
      createdBy: actor.user?.id ?? null,
    })
  audit(em, actor, {
    action: created ? 'dataset.share' : 'dataset.share.update',
    targetType: 'Dataset',
    targetId: dataset.accession,
    details: { with: email, capabilities },
  })
  await em.flush()

  await deps.mailer.send(shareMail(actor, deps, dataset, input, invitationOpen(user)))
  return { share: toShareDto(share, user), created }
}

export async function revokeShare(
  em: EntityManager,
  actor: Actor,
  dataset: IDataset,
  shareId: number,
) {
  const share = await em.findOne(DatasetShare, { id: shareId, dataset: dataset.id })
  if (!share) throw new NotFoundError('share', shareId)
  audit(em, actor, {
    action: 'dataset.unshare',
    targetType: 'Dataset',
    targetId: dataset.accession,
    details: { user: share.user },
  })
  em.remove(share)
  await em.flush()
}
