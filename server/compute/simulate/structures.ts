/**
 * Target sites of each structure kind, written into typed arrays: positions in nm on a square
 * field [0, fieldNm]², z (3D) within the axial range.
 */
import { placeOnFilaments } from './filaments'
import { SIMULATION_DEFAULTS as D, type Structure } from './options'
import type { Random } from './random'
import type { StructureTargets } from './targets'

function uniformZ(targets: StructureTargets, random: Random): number {
  const [low, high] = targets.zRange ?? [0, 0]
  return low + random.uniform() * (high - low)
}

function placeUniform(targets: StructureTargets, random: Random): void {
  for (let i = targets.start; i < targets.start + targets.count; i++) {
    targets.x[i] = random.uniform() * targets.fieldNm
    targets.y[i] = random.uniform() * targets.fieldNm
    if (targets.z) targets.z[i] = uniformZ(targets, random)
  }
}

function placeClusters(targets: StructureTargets, random: Random, count: number, radius: number) {
  const centres = new Float64Array(3 * count)
  for (let c = 0; c < count; c++) {
    centres[3 * c] = radius + random.uniform() * (targets.fieldNm - 2 * radius)
    centres[3 * c + 1] = radius + random.uniform() * (targets.fieldNm - 2 * radius)
    centres[3 * c + 2] = uniformZ(targets, random)
  }
  for (let i = targets.start; i < targets.start + targets.count; i++) {
    const c = random.integer(count)
    targets.x[i] = (centres[3 * c] ?? 0) + radius * random.normal()
    targets.y[i] = (centres[3 * c + 1] ?? 0) + radius * random.normal()
    if (targets.z) targets.z[i] = (centres[3 * c + 2] ?? 0) + radius * random.normal()
  }
}

/**
 * Ring centres at random, keeping centres 3 radii apart where 30 tries allow (a hash grid). A field
 * too full for that spacing (exclusion squares covering over half of it) takes centres as drawn.
 */
function ringCentres(fieldNm: number, count: number, radius: number, random: Random): Float64Array {
  const spacing = 3 * radius
  const tries = count * spacing * spacing > 0.5 * fieldNm * fieldNm ? 1 : 30
  const cells = Math.max(1, Math.floor(fieldNm / spacing))
  const grid = new Map<number, number[]>()
  const centres = new Float64Array(2 * count)
  for (let r = 0; r < count; r++) {
    let x = 0
    let y = 0
    for (let attempt = 0; attempt < tries; attempt++) {
      x = radius + random.uniform() * (fieldNm - 2 * radius)
      y = radius + random.uniform() * (fieldNm - 2 * radius)
      if (!crowded(grid, centres, x, y, spacing, cells)) break
    }
    centres[2 * r] = x
    centres[2 * r + 1] = y
    const key = Math.floor(x / spacing) * (cells + 2) + Math.floor(y / spacing)
    const list = grid.get(key)
    if (list) list.push(r)
    else grid.set(key, [r])
  }
  return centres
}

function crowded(
  grid: Map<number, number[]>,
  centres: Float64Array,
  x: number,
  y: number,
  spacing: number,
  cells: number,
): boolean {
  const cx = Math.floor(x / spacing)
  const cy = Math.floor(y / spacing)
  for (let i = cx - 1; i <= cx + 1; i++) {
    for (let j = cy - 1; j <= cy + 1; j++) {
      for (const r of grid.get(i * (cells + 2) + j) ?? []) {
        const dx = (centres[2 * r] ?? 0) - x
        const dy = (centres[2 * r + 1] ?? 0) - y
        if (dx * dx + dy * dy < spacing * spacing) return true
      }
    }
  }
  return false
}

interface RingParameters {
  count: number
  radiusNm: number
  sites: number
  siteSpreadNm: number
}

function placeRings(targets: StructureTargets, random: Random, p: RingParameters): void {
  const centres = ringCentres(targets.fieldNm, p.count, p.radiusNm, random)
  const rotation = new Float64Array(p.count)
  const ringZ = new Float64Array(p.count)
  for (let r = 0; r < p.count; r++) {
    rotation[r] = (random.uniform() * 2 * Math.PI) / p.sites
    ringZ[r] = uniformZ(targets, random)
  }
  for (let i = targets.start; i < targets.start + targets.count; i++) {
    const r = random.integer(p.count)
    const angle = (rotation[r] ?? 0) + (2 * Math.PI * random.integer(p.sites)) / p.sites
    targets.x[i] =
      (centres[2 * r] ?? 0) + p.radiusNm * Math.cos(angle) + p.siteSpreadNm * random.normal()
    targets.y[i] =
      (centres[2 * r + 1] ?? 0) + p.radiusNm * Math.sin(angle) + p.siteSpreadNm * random.normal()
    if (targets.z) targets.z[i] = (ringZ[r] ?? 0) + p.siteSpreadNm * random.normal()
  }
}

/** Writes the target sites of one structure. */
export function placeStructure(
  structure: Structure,
  targets: StructureTargets,
  random: Random,
): void {
  if (targets.count === 0) return
  switch (structure.kind) {
    case 'uniform':
      return placeUniform(targets, random)
    case 'clusters':
      return placeClusters(
        targets,
        random,
        Math.max(1, Math.round(structure.count ?? D.clusterCount)),
        structure.radiusNm ?? D.clusterRadiusNm,
      )
    case 'rings': {
      const sites = Math.max(1, Math.round(structure.sites ?? D.ringSites))
      return placeRings(targets, random, {
        count: Math.max(1, Math.round(structure.count ?? Math.ceil(targets.count / sites))),
        radiusNm: structure.radiusNm ?? D.ringRadiusNm,
        sites,
        siteSpreadNm: structure.siteSpreadNm ?? D.ringSiteSpreadNm,
      })
    }
    case 'filaments':
      return placeOnFilaments(
        targets,
        {
          count: Math.max(1, Math.round(structure.count ?? D.filamentCount)),
          diameterNm: structure.diameterNm ?? D.filamentDiameterNm,
          persistenceNm: structure.persistenceNm ?? D.filamentPersistenceNm,
        },
        random,
      )
  }
}
