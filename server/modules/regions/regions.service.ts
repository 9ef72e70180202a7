import type { AuditAction } from '@shared/domain/audit-actions'
import type { EntityManager } from '@mikro-orm/better-sqlite'
import type { PreviewInfo } from '@shared/schemas/preview.schema'
import {
  shapeOfGeometry,
  GEOMETRY_OF_SHAPE,
  type CreateRegionBody,
  type PatchRegionBody,
  type RegionDto,
} from '@shared/schemas/region.schema'
import { ValidationError } from '../../errors/http-error'
import type { Actor } from '../../services'
import { audit } from '../audit/audit.service'
import { presentAuthor } from '../comments/present-author'
import type { DatasetFacts } from '../datasets/dataset-access'
import type { DatasetEventHub } from '../events/dataset-events'
import { User } from '../users/user.entity'
import { Region, type IRegion } from './region.entity'
import { checkGeometry, maySupervise } from './region-rules'

/** A region as every reader sees it, before it is presented to one of them. */
export type RegionFacts = Omit<RegionDto, 'author' | 'canChange'> & {
  author: { id: number; name: string }
  project: number
}

async function authorNames(em: EntityManager, ids: number[]) {
  const users = await em.find(User, { id: { $in: [...new Set(ids)] } }, { fields: ['name'] })
  return new Map(users.map((u) => [u.id, u.name]))
}

async function factsOf(
  em: EntityManager,
  project: number,
  regions: IRegion[],
): Promise<RegionFacts[]> {
  const names = await authorNames(
    em,
    regions.map((r) => r.author),
  )
  return regions.map((r) => ({
    id: r.id,
    datasetId: r.dataset,
    fileId: r.file,
    project,
    label: r.label,
    colour: r.colour,
    shape: r.shape,
    geometry: r.geometry,
    author: { id: r.author, name: names.get(r.author) ?? '' },
    createdAt: r.createdAt.toISOString(),
    updatedAt: r.updatedAt.toISOString(),
  }))
}

/** The region as one reader sees it: the author as they may see it, whether they may change it. */
export function presentRegion(facts: RegionFacts, reader: Actor): RegionDto {
  const { project, ...rest } = facts
  return {
    ...rest,
    author: presentAuthor(reader, facts.author),
    canChange: maySupervise(reader.viewer, project, facts.author.id),
  }
}

export async function listRegions(
  em: EntityManager,
  reader: Actor,
  dataset: DatasetFacts,
  fileId?: number,
): Promise<RegionDto[]> {
  const rows = await em.find(
    Region,
    fileId === undefined ? { dataset: dataset.id } : { dataset: dataset.id, file: fileId },
    { orderBy: { createdAt: 'asc', id: 'asc' } },
  )
  return (await factsOf(em, dataset.project, rows)).map((f) => presentRegion(f, reader))
}

const auditRegion = (
  em: EntityManager,
  actor: Actor,
  dataset: DatasetFacts,
  action: Extract<AuditAction, `region.${string}`>,
) => audit(em, actor, { action, targetType: 'Dataset', targetId: dataset.accession })

export class RegionsService {
  constructor(
    private readonly events: DatasetEventHub,
    private readonly clock: () => Date,
  ) {}

  async create(
    em: EntityManager,
    actor: Actor,
    dataset: DatasetFacts,
    fileId: number,
    bounds: PreviewInfo['boundsNm'],
    input: CreateRegionBody,
  ): Promise<RegionDto> {
    checkGeometry(input.geometry, bounds)
    const now = this.clock()
    const region = em.create(Region, {
      dataset: dataset.id,
      file: fileId,
      author: actor.user!.id,
      label: input.label,
      colour: input.colour,
      shape: input.shape ?? shapeOfGeometry(input.geometry),
      geometry: input.geometry,
      createdAt: now,
      updatedAt: now,
    })
    auditRegion(em, actor, dataset, 'region.create')
    await em.flush()
    return this.announce(em, actor, dataset, region, 'region.created')
  }

  async update(
    em: EntityManager,
    actor: Actor,
    dataset: DatasetFacts,
    region: IRegion,
    bounds: PreviewInfo['boundsNm'] | null,
    input: PatchRegionBody,
  ): Promise<RegionDto> {
    if (input.geometry && bounds) checkGeometry(input.geometry, bounds)
    const geometry = input.geometry ?? region.geometry
    const shape = input.shape ?? (input.geometry ? shapeOfGeometry(geometry) : region.shape)
    if (GEOMETRY_OF_SHAPE[shape] !== geometry.type)
      throw new ValidationError([
        { pointer: '#/shape', detail: 'The shape does not match the geometry' },
      ])
    em.assign(region, {
      label: input.label ?? region.label,
      colour: input.colour ?? region.colour,
      geometry,
      shape,
      updatedAt: this.clock(),
    })
    auditRegion(em, actor, dataset, 'region.update')
    await em.flush()
    return this.announce(em, actor, dataset, region, 'region.updated')
  }

  async remove(em: EntityManager, actor: Actor, dataset: DatasetFacts, region: IRegion) {
    const id = region.id
    em.remove(region)
    auditRegion(em, actor, dataset, 'region.delete')
    await em.flush()
    this.events.publish({ datasetId: dataset.id, name: 'region.deleted', data: { id } })
  }

  private async announce(
    em: EntityManager,
    actor: Actor,
    dataset: DatasetFacts,
    region: IRegion,
    name: 'region.created' | 'region.updated',
  ) {
    const [facts] = await factsOf(em, dataset.project, [region])
    this.events.publish({ datasetId: dataset.id, name, data: facts! })
    return presentRegion(facts!, actor)
  }
}
