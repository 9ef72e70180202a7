import { z } from 'zod'

/** A point in sample coordinates, nanometres. ROIs never use render pixels (they survive re-rendering). */
const pointNm = z.tuple([z.number().finite(), z.number().finite()])

export const REGION_SHAPES = ['point', 'rectangle', 'polygon'] as const

export const regionSchema = z
  .object({
    shape: z.enum(REGION_SHAPES),
    /** point: one; rectangle: two opposite corners; polygon: three or more vertices. */
    pointsNm: z.array(pointNm).min(1).max(500),
  })
  .refine(
    (r) =>
      (r.shape === 'point' && r.pointsNm.length === 1) ||
      (r.shape === 'rectangle' && r.pointsNm.length === 2) ||
      (r.shape === 'polygon' && r.pointsNm.length >= 3),
    {
      error: 'A point has one vertex, a rectangle two corners, a polygon at least three vertices',
      path: ['pointsNm'],
    },
  )
  .meta({ id: 'Region' })
export type Region = z.infer<typeof regionSchema>

export const createCommentSchema = z
  .object({
    body: z
      .string()
      .trim()
      .min(1, 'Write something')
      .max(10_000, 'A comment can have at most 10000 characters'),
    region: regionSchema.nullable().default(null),
    replyTo: z.number().int().positive().nullable().default(null),
  })
  .meta({ id: 'CreateComment' })
export type CreateCommentInput = z.input<typeof createCommentSchema>
export type CreateCommentBody = z.output<typeof createCommentSchema>

export const commentSchema = z
  .object({
    id: z.number(),
    author: z.object({ id: z.number(), name: z.string() }),
    body: z.string(),
    region: regionSchema.nullable(),
    replyTo: z.number().nullable(),
    createdAt: z.string(),
  })
  .meta({ id: 'Comment' })
export type CommentDto = z.infer<typeof commentSchema>
