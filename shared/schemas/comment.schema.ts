import { z } from 'zod'
import { authorSchema } from './region.schema'

/**
 * Threads: a comment with no `replyTo` opens a thread on the dataset or, with `regionId`, on one
 * region of interest; replies name the thread's first comment. Bodies are Markdown; the server
 * renders them to sanitised HTML (`bodyHtml`), so the page never shows HTML a person typed.
 * `@someone@lab.org` mentions a person by e-mail address; those with access to the dataset are
 * told by mail, and nobody learns whether an address belongs to anyone.
 */

export const COMMENT_MAX_CHARS = 10_000

const commentBody = z
  .string()
  .trim()
  .min(1, 'Write something')
  .max(COMMENT_MAX_CHARS, `A comment can have at most ${COMMENT_MAX_CHARS} characters`)

export const createCommentSchema = z
  .object({
    body: commentBody,
    /** The region the thread is about; null for the dataset as a whole. */
    regionId: z.number().int().positive().nullable().default(null),
    /** The first comment of the thread answered; null opens a new thread. */
    replyTo: z.number().int().positive().nullable().default(null),
  })
  .meta({ id: 'CreateComment' })
export type CreateCommentInput = z.input<typeof createCommentSchema>
export type CreateCommentBody = z.output<typeof createCommentSchema>

export const editCommentSchema = z.object({ body: commentBody }).meta({ id: 'EditComment' })
export type EditCommentBody = z.output<typeof editCommentSchema>

export const listCommentsQuerySchema = z.object({
  regionId: z.coerce.number().int().positive().optional(),
})

export const commentSchema = z
  .object({
    id: z.number(),
    datasetId: z.number(),
    regionId: z.number().nullable(),
    replyTo: z.number().nullable(),
    author: authorSchema,
    /** The Markdown as written (for editing). */
    body: z.string(),
    /** The Markdown rendered and sanitised on the server. */
    bodyHtml: z.string(),
    createdAt: z.string(),
    /** Set when the author changed the text after posting. */
    editedAt: z.string().nullable(),
    /** Until when the one asking may still edit it (their own comments only). */
    editableUntil: z.string().nullable(),
    /** On a thread's first comment: when the thread was resolved; null while open. */
    resolvedAt: z.string().nullable(),
  })
  .meta({ id: 'Comment' })
export type CommentDto = z.infer<typeof commentSchema>

/** A thread that mentions the person asking, for their home page. */
export const mentionSchema = z
  .object({
    comment: commentSchema,
    dataset: z.object({ id: z.number(), accession: z.string(), title: z.string() }),
    region: z.object({ id: z.number(), fileId: z.number(), label: z.string() }).nullable(),
  })
  .meta({ id: 'Mention' })
export type MentionDto = z.infer<typeof mentionSchema>

/** What the dataset's event stream carries (`GET /api/datasets/:id/events`). */
export type DatasetEventName =
  'comment.created' | 'comment.updated' | 'region.created' | 'region.updated' | 'region.deleted'
