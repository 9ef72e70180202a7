import type { EntityManager } from '@mikro-orm/better-sqlite'
import type { CommentDto, CreateCommentBody } from '@shared/schemas/comment.schema'
import { ValidationError } from '../../errors/http-error'
import type { Actor } from '../../services'
import { audit } from '../audit/audit.service'
import type { IDataset } from '../datasets/dataset.entity'
import { User } from '../users/user.entity'
import { Comment, type IComment } from './comment.entity'

async function toDtos(em: EntityManager, comments: IComment[]): Promise<CommentDto[]> {
  const users = await em.find(
    User,
    { id: { $in: [...new Set(comments.map((c) => c.author))] } },
    { fields: ['name'] },
  )
  const name = new Map(users.map((u) => [u.id, u.name]))
  return comments.map((c) => ({
    id: c.id,
    author: { id: c.author, name: name.get(c.author) ?? '' },
    body: c.body,
    region: c.region ?? null,
    replyTo: c.replyTo ?? null,
    createdAt: c.createdAt.toISOString(),
  }))
}

export async function listComments(em: EntityManager, dataset: IDataset): Promise<CommentDto[]> {
  return toDtos(
    em,
    await em.find(Comment, { dataset: dataset.id }, { orderBy: { createdAt: 'asc', id: 'asc' } }),
  )
}

export async function addComment(
  em: EntityManager,
  actor: Actor,
  dataset: IDataset,
  input: CreateCommentBody,
): Promise<CommentDto> {
  if (
    input.replyTo !== null &&
    !(await em.count(Comment, { id: input.replyTo, dataset: dataset.id }))
  ) {
    throw new ValidationError([
      { pointer: '#/replyTo', detail: `No comment ${input.replyTo} on this dataset.` },
    ])
  }
  const comment = em.create(Comment, { dataset: dataset.id, author: actor.user!.id, ...input })
  audit(em, actor, {
    action: 'dataset.comment',
    targetType: 'Dataset',
    targetId: dataset.accession,
  })
  await em.flush()
  const [dto] = await toDtos(em, [comment])
  return dto!
}
