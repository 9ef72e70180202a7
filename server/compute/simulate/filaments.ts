/**
 * Filaments: random smooth curves across the field, each a worm-like chain (tangent angle takes
 * Gaussian steps of variance step/persistence, the 2D chain's bending statistics), with emitters on
 * the surface of a hollow tube around the curve.
 */
import type { Random } from './random'
import { firstAbove, type StructureTargets } from './targets'

const STEP_NM = 20
const MAX_STEPS_PER_SIDE = 5000

interface Curve {
  x: Float64Array
  y: Float64Array
  /** Axial position at either end (3D); linear in between. */
  zStart: number
  zEnd: number
}

function walk(
  random: Random,
  fieldNm: number,
  x0: number,
  y0: number,
  angle0: number,
  angleStep: number,
): number[] {
  const points: number[] = []
  let x = x0
  let y = y0
  let angle = angle0
  for (let i = 0; i < MAX_STEPS_PER_SIDE; i++) {
    angle += angleStep * random.normal()
    x += STEP_NM * Math.cos(angle)
    y += STEP_NM * Math.sin(angle)
    if (x < 0 || y < 0 || x > fieldNm || y > fieldNm) break
    points.push(x, y)
  }
  return points
}

function makeCurve(
  random: Random,
  fieldNm: number,
  persistenceNm: number,
  zRange: number[],
): Curve {
  const x0 = random.uniform() * fieldNm
  const y0 = random.uniform() * fieldNm
  const angle = random.uniform() * 2 * Math.PI
  const angleStep = Math.sqrt(STEP_NM / persistenceNm)
  const forward = walk(random, fieldNm, x0, y0, angle, angleStep)
  const backward = walk(random, fieldNm, x0, y0, angle + Math.PI, angleStep)
  const points = backward.length / 2 + 1 + forward.length / 2
  const x = new Float64Array(points)
  const y = new Float64Array(points)
  let p = 0
  for (let i = backward.length - 2; i >= 0; i -= 2, p++) {
    x[p] = backward[i] ?? 0
    y[p] = backward[i + 1] ?? 0
  }
  x[p] = x0
  y[p++] = y0
  for (let i = 0; i < forward.length; i += 2, p++) {
    x[p] = forward[i] ?? 0
    y[p] = forward[i + 1] ?? 0
  }
  const [zLow = 0, zHigh = 0] = zRange
  const zStart = zLow + random.uniform() * (zHigh - zLow)
  const zEnd = zLow + random.uniform() * (zHigh - zLow)
  return { x, y, zStart, zEnd }
}

export interface FilamentParameters {
  count: number
  diameterNm: number
  persistenceNm: number
}

/** Writes site i: a random point on the tube's surface at arc position `along` (in steps). */
function placeOnTube(
  targets: StructureTargets,
  i: number,
  at: { curve: Curve; along: number; radius: number },
  random: Random,
): void {
  const { curve, along, radius } = at
  const segment = Math.min(curve.x.length - 2, Math.floor(along))
  const fraction = along - segment
  const xa = curve.x[segment] ?? 0
  const ya = curve.y[segment] ?? 0
  const dx = (curve.x[segment + 1] ?? 0) - xa
  const dy = (curve.y[segment + 1] ?? 0) - ya
  // A point on the tube's circular cross-section: one component across the curve, one along z.
  const around = random.uniform() * 2 * Math.PI
  const across = (radius * Math.cos(around)) / STEP_NM
  targets.x[i] = xa + fraction * dx - across * dy
  targets.y[i] = ya + fraction * dy + across * dx
  if (targets.z) {
    const curveFraction = (segment + fraction) / (curve.x.length - 1)
    const zAxis = curve.zStart + curveFraction * (curve.zEnd - curve.zStart)
    targets.z[i] = zAxis + radius * Math.sin(around)
  }
}

/** Places `targets.count` tube-surface sites on `count` random curves, chosen by curve length. */
export function placeOnFilaments(
  targets: StructureTargets,
  parameters: FilamentParameters,
  random: Random,
): void {
  const { fieldNm, zRange } = targets
  const radius = parameters.diameterNm / 2
  const curves: Curve[] = []
  const cumulativeSegments = new Float64Array(parameters.count)
  let segments = 0
  for (let c = 0; c < parameters.count; c++) {
    const curve = makeCurve(random, fieldNm, parameters.persistenceNm, zRange ?? [0, 0])
    curves.push(curve)
    segments += Math.max(0, curve.x.length - 1)
    cumulativeSegments[c] = segments
  }
  for (let i = targets.start; i < targets.start + targets.count; i++) {
    const position = random.uniform() * segments
    const c = firstAbove(cumulativeSegments, position)
    const curve = curves[c]
    if (!curve || curve.x.length < 2) {
      targets.x[i] = random.uniform() * fieldNm
      targets.y[i] = random.uniform() * fieldNm
      continue
    }
    const along = position - ((cumulativeSegments[c] ?? 0) - (curve.x.length - 1))
    placeOnTube(targets, i, { curve, along, radius }, random)
  }
}
