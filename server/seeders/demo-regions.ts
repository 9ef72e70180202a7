import type { EntityManager } from '@mikro-orm/better-sqlite'
import type { RegionGeometry, RegionShape } from '@shared/schemas/region.schema'
import { Comment, CommentMention } from '../modules/comments/comment.entity'
import { renderCommentMarkdown } from '../modules/comments/markdown'
import { Dataset } from '../modules/datasets/dataset.entity'
import { DatasetFile } from '../modules/files/dataset-file.entity'
import { Region } from '../modules/regions/region.entity'
import { User } from '../modules/users/user.entity'

const DATASET = 'Bassoon 3D astigmatic STORM, cortical slices'
const TABLE = 'bassoon_3d_locs.csv'
const OWNER = 'lena.ortolan@vesperridge.example'
const COLLABORATOR = 'priya.vantongeren@elsewhere.example'

const REGIONS: {
  by: string
  label: string
  colour: string
  shape: RegionShape
  geometry: RegionGeometry
}[] = [
  {
    by: COLLABORATOR,
    label: 'Bright cluster, upper left',
    colour: '#e08a3c',
    shape: 'ellipse',
    geometry: { type: 'Ellipse', center: [3200, 2800], radii: [700, 450], rotation: 0 },
  },
  {
    by: OWNER,
    label: 'Sparse patch for background',
    colour: '#3b7dd8',
    shape: 'rectangle',
    geometry: {
      type: 'Polygon',
      coordinates: [
        [
          [6000, 6000],
          [7800, 6000],
          [7800, 7600],
          [6000, 7600],
          [6000, 6000],
        ],
      ],
    },
  },
]

/**
 * Two regions with a short thread on the demo's shared 3D table: the external collaborator asks
 * the owner about a cluster (mentioning her), the owner answers. Invented, for the demo only;
 * left alone when the table already has regions.
 */
export async function seedDemoRegions(em: EntityManager): Promise<void> {
  const dataset = await em.findOne(Dataset, { title: DATASET })
  const file = dataset && (await em.findOne(DatasetFile, { dataset: dataset.id, name: TABLE }))
  const owner = await em.findOne(User, { email: OWNER })
  const collaborator = await em.findOne(User, { email: COLLABORATOR })
  if (!dataset || !file || !owner || !collaborator) return
  if (await em.count(Region, { file: file.id })) return
  const person = (email: string) => (email === OWNER ? owner : collaborator)
  const started = Date.now() - 3 * 3600_000
  const at = (minutes: number) => new Date(started + minutes * 60_000)

  const [cluster] = REGIONS.map((r, i) =>
    em.create(Region, {
      dataset: dataset.id,
      file: file.id,
      author: person(r.by).id,
      label: r.label,
      colour: r.colour,
      shape: r.shape,
      geometry: r.geometry,
      createdAt: at(i * 5),
      updatedAt: at(i * 5),
    }),
  )
  await em.flush()
  const say = (by: string, body: string, minutes: number, replyTo: number | null = null) =>
    em.create(Comment, {
      dataset: dataset.id,
      region: cluster!.id,
      author: person(by).id,
      body,
      bodyHtml: renderCommentMarkdown(body),
      replyTo,
      createdAt: at(minutes),
    })
  const question = say(
    COLLABORATOR,
    `@${OWNER} is this cluster **one** active zone seen twice, or two neighbouring ones? The axial spread looks wider than the others.`,
    12,
  )
  await em.flush()
  const answer = say(
    OWNER,
    `Two, I think: the slice is tilted here. @${COLLABORATOR} compare it with the sparse patch, which has the same background.`,
    40,
    question.id,
  )
  await em.flush()
  em.create(CommentMention, { comment: question.id, user: owner.id })
  em.create(CommentMention, { comment: answer.id, user: collaborator.id })
  await em.flush()
}
