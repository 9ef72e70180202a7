import type { EntityManager } from '@mikro-orm/better-sqlite'
import type { DatasetShareDto, ShareDatasetBody } from '@shared/schemas/dataset.schema'
import { ConflictError, NotFoundError } from '../../errors/http-error'
import type { Actor, AppDeps } from '../../services'
import { audit } from '../audit/audit.service'
import { Membership } from '../projects/project.entity'
import { User, type IUser } from '../users/user.entity'
import { findOrInviteUser } from '../users/users.service'
import { DatasetShare, type IDataset, type IDatasetShare } from './dataset.entity'

function toShareDto(share: IDatasetShare, user: IUser): DatasetShareDto {
  return {
    id: share.id,
    userId: user.id,
    email: user.email,
    name: user.name,
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
 * Shares a dataset with one person (creating an invitation if they have never signed in), makes
 * them a collaborator of the project so they can find it, and tells them by e-mail.
 */
export async function shareDataset(
  em: EntityManager,
  actor: Actor,
  deps: Pick<AppDeps, 'mailer' | 'config'>,
  dataset: IDataset,
  input: ShareDatasetBody,
): Promise<{ share: DatasetShareDto; created: boolean }> {
  const { email, capabilities, message } = input
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

  const can = capabilities.length
    ? `read its description and ${capabilities.join(', ')}`
    : 'read its description'
  await deps.mailer.send({
    to: email,
    subject: `${actor.user?.name ?? 'Someone'} shared ${dataset.accession} with you on Stipple`,
    text: [
      `${actor.user?.name ?? 'A Stipple user'} shared the dataset ${dataset.accession} "${dataset.title}" with you.`,
      `You can ${can}.`,
      message ? `\nTheir message:\n${message}\n` : '',
      `Open it here (sign in with ${email}):`,
      `${deps.config.publicUrl}/datasets/${dataset.accession}`,
    ].join('\n'),
  })
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
