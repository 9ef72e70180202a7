import type { EntityManager } from '@mikro-orm/better-sqlite'
import { defineAbilityFor } from '@shared/permissions/abilities'
import type {
  CommentDto,
  CreateCommentBody,
  EditCommentBody,
  MentionDto,
} from '@shared/schemas/comment.schema'
import { ConflictError, ForbiddenError, ValidationError } from '../../errors/http-error'
import type { Actor, AppDeps } from '../../services'
import { audit } from '../audit/audit.service'
import { subjectOf, type DatasetFacts } from '../datasets/dataset-access'
import { Dataset } from '../datasets/dataset.entity'
import type { DatasetEventHub } from '../events/dataset-events'
import { Region } from '../regions/region.entity'
import { User } from '../users/user.entity'
import { loadViewer } from '../users/viewer.service'
import { Comment, CommentMention, type IComment } from './comment.entity'
import { mentionedAddresses, renderCommentMarkdown } from './markdown'
import { presentAuthor } from './present-author'

/** A comment as every reader sees it, before it is presented to one of them. */
export type CommentFacts = Omit<CommentDto, 'author' | 'editableUntil'> & {
  author: { id: number; name: string }
  editWindowEnds: string
}

export function presentComment(facts: CommentFacts, reader: Actor): CommentDto {
  const { editWindowEnds, ...rest } = facts
  return {
    ...rest,
    author: presentAuthor(reader, facts.author),
    editableUntil: reader.user?.id === facts.author.id ? editWindowEnds : null,
  }
}

type Deps = Pick<AppDeps, 'mailer' | 'config' | 'logger'>

export class CommentsService {
  constructor(
    private readonly deps: Deps,
    private readonly events: DatasetEventHub,
    private readonly clock: () => Date,
  ) {}

  private get editWindowMs() {
    return this.deps.config.comments.editWindowMs
  }

  async factsOf(em: EntityManager, comments: IComment[]): Promise<CommentFacts[]> {
    const users = await em.find(
      User,
      { id: { $in: [...new Set(comments.map((c) => c.author))] } },
      { fields: ['name'] },
    )
    const name = new Map(users.map((u) => [u.id, u.name]))
    return comments.map((c) => ({
      id: c.id,
      datasetId: c.dataset,
      regionId: c.region ?? null,
      replyTo: c.replyTo ?? null,
      author: { id: c.author, name: name.get(c.author) ?? '' },
      body: c.body,
      // Rows from before rendered HTML was stored are rendered when read.
      bodyHtml: c.bodyHtml || renderCommentMarkdown(c.body),
      createdAt: c.createdAt.toISOString(),
      editedAt: c.editedAt?.toISOString() ?? null,
      editWindowEnds: new Date(c.createdAt.getTime() + this.editWindowMs).toISOString(),
      resolvedAt: c.resolvedAt?.toISOString() ?? null,
    }))
  }

  async list(
    em: EntityManager,
    reader: Actor,
    dataset: DatasetFacts,
    regionId?: number,
  ): Promise<CommentDto[]> {
    const where =
      regionId === undefined ? { dataset: dataset.id } : { dataset: dataset.id, region: regionId }
    const rows = await em.find(Comment, where, { orderBy: { createdAt: 'asc', id: 'asc' } })
    return (await this.factsOf(em, rows)).map((f) => presentComment(f, reader))
  }

  async add(
    em: EntityManager,
    actor: Actor,
    dataset: DatasetFacts,
    input: CreateCommentBody,
  ): Promise<CommentDto> {
    let regionId = input.regionId
    if (input.replyTo !== null) {
      const root = await em.findOne(Comment, { id: input.replyTo, dataset: dataset.id })
      if (!root || root.replyTo !== null)
        throw new ValidationError([
          { pointer: '#/replyTo', detail: `No thread starts with comment ${input.replyTo} here.` },
        ])
      if (regionId !== null && regionId !== (root.region ?? null))
        throw new ValidationError([
          { pointer: '#/regionId', detail: 'A reply belongs to its thread’s region.' },
        ])
      regionId = root.region ?? null
    } else if (
      regionId !== null &&
      !(await em.count(Region, { id: regionId, dataset: dataset.id }))
    )
      throw new ValidationError([
        { pointer: '#/regionId', detail: `No region ${regionId} on this dataset.` },
      ])

    const comment = em.create(Comment, {
      dataset: dataset.id,
      region: regionId,
      author: actor.user!.id,
      body: input.body,
      bodyHtml: renderCommentMarkdown(input.body),
      replyTo: input.replyTo,
      createdAt: this.clock(),
    })
    audit(em, actor, {
      action: 'dataset.comment',
      targetType: 'Dataset',
      targetId: dataset.accession,
    })
    await em.flush()
    const notify = await this.recordMentions(em, actor, dataset, comment, [])
    return this.announce(em, actor, comment, 'comment.created', notify)
  }

  /** Changes the text within the edit window; only its author may. */
  async edit(
    em: EntityManager,
    actor: Actor,
    dataset: DatasetFacts,
    comment: IComment,
    input: EditCommentBody,
  ): Promise<CommentDto> {
    if (comment.author !== actor.user?.id)
      throw new ForbiddenError('Only its author can edit a comment.')
    const now = this.clock()
    if (now.getTime() > comment.createdAt.getTime() + this.editWindowMs)
      throw new ConflictError(
        `A comment can be edited for ${Math.round(this.editWindowMs / 60_000)} minutes after it is posted; write a new one instead.`,
      )
    const before = mentionedAddresses(comment.body)
    comment.body = input.body
    comment.bodyHtml = renderCommentMarkdown(input.body)
    comment.editedAt = now
    await em.flush()
    const notify = await this.recordMentions(em, actor, dataset, comment, before)
    return this.announce(em, actor, comment, 'comment.updated', notify)
  }

  /** Resolves or reopens a thread (its first comment); anyone who may annotate may. */
  async setResolved(
    em: EntityManager,
    actor: Actor,
    comment: IComment,
    resolved: boolean,
  ): Promise<CommentDto> {
    if (comment.replyTo !== null)
      throw new ValidationError([
        { pointer: '#/', detail: 'Resolve the thread through its first comment.' },
      ])
    comment.resolvedAt = resolved ? this.clock() : null
    comment.resolvedBy = resolved ? actor.user!.id : null
    await em.flush()
    return this.announce(em, actor, comment, 'comment.updated', [])
  }

  /**
   * Mentions of people who may see the dataset's discussion (its previews) are recorded and
   * mailed; addresses of nobody, or of people without access, are dropped without a trace, so
   * the answer is the same whoever the address belongs to. `already` were mentioned before.
   */
  private async recordMentions(
    em: EntityManager,
    actor: Actor,
    dataset: DatasetFacts,
    comment: IComment,
    already: string[],
  ): Promise<{ email: string; name: string }[]> {
    const addresses = mentionedAddresses(comment.body).filter((a) => !already.includes(a))
    if (!addresses.length) return []
    const people = await em.find(User, { email: { $in: addresses } })
    const now = this.clock()
    const notify: { email: string; name: string }[] = []
    for (const person of people) {
      if (person.id === actor.user?.id) continue
      const ability = defineAbilityFor(await loadViewer(em, person), now)
      if (!ability.can('preview', subjectOf(dataset))) continue
      em.create(CommentMention, { comment: comment.id, user: person.id })
      notify.push({ email: person.email, name: person.name })
    }
    await em.flush()
    return notify
  }

  private async announce(
    em: EntityManager,
    actor: Actor,
    comment: IComment,
    name: 'comment.created' | 'comment.updated',
    notify: { email: string; name: string }[],
  ): Promise<CommentDto> {
    const [facts] = await this.factsOf(em, [comment])
    this.events.publish({ datasetId: comment.dataset, name, data: facts! })
    if (notify.length) {
      const dataset = await em.findOne(
        Dataset,
        { id: comment.dataset },
        { fields: ['accession', 'title'] },
      )
      // Mail goes after the answer; a slow mail server never holds up the comment.
      if (dataset) void this.mailMentions(dataset, facts!, notify)
    }
    return presentComment(facts!, actor)
  }

  private async mailMentions(
    dataset: { accession: string; title: string },
    facts: CommentFacts,
    people: { email: string; name: string }[],
  ) {
    const link = `${this.deps.config.publicUrl}/datasets/${dataset.accession}`
    for (const person of people)
      await this.deps.mailer.send({
        to: person.email,
        subject: `${facts.author.name} mentioned you on ${dataset.accession}`,
        text: `${facts.author.name} mentioned you in a comment on ${dataset.accession} (${dataset.title}):\n\n${facts.body}\n\nOpen the discussion: ${link}\n`,
      })
  }

  /** Comments that mention the reader, newest first, on datasets they may still see. */
  async mentionsOf(em: EntityManager, reader: Actor, limit = 50): Promise<MentionDto[]> {
    const userId = reader.user?.id
    if (!userId) return []
    const mentions = await em.find(
      CommentMention,
      { user: userId },
      { orderBy: { comment: 'desc' }, limit: limit * 2 },
    )
    const comments = await em.find(
      Comment,
      { id: { $in: mentions.map((m) => m.comment) } },
      {
        orderBy: { id: 'desc' },
      },
    )
    const datasets = new Map(
      (await em.find(Dataset, { id: { $in: [...new Set(comments.map((c) => c.dataset))] } })).map(
        (d) => [d.id, d],
      ),
    )
    const visible = comments
      .filter((c) => {
        const d = datasets.get(c.dataset)
        return d && reader.ability.can('preview', subjectOf(d))
      })
      .slice(0, limit)
    const regionIds = visible.map((c) => c.region).filter((r): r is number => r != null)
    const regions = new Map(
      (await em.find(Region, { id: { $in: regionIds } })).map((r) => [r.id, r]),
    )
    const facts = await this.factsOf(em, visible)
    return facts.map((f, i) => {
      const d = datasets.get(visible[i]!.dataset)!
      const r = f.regionId === null ? undefined : regions.get(f.regionId)
      return {
        comment: presentComment(f, reader),
        dataset: { id: d.id, accession: d.accession, title: d.title },
        region: r ? { id: r.id, fileId: r.file, label: r.label } : null,
      }
    })
  }
}
