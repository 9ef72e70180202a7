import type { PairShifts } from './correlate-pairs'

export interface SolvedDrift {
  /** Drift of each segment relative to segment 0, nm. */
  x: Float64Array
  y: Float64Array
  pairsUsed: number
  pairsDropped: number
  /** RMS of |r_ij − (d_j − d_i)| over the pairs used, nm. */
  rmsResidualNm: number
  /** False when some segment is linked to segment 0 by no usable pair. */
  connected: boolean
}

/**
 * Redundant cross-correlation (Wang et al. 2014): solve r_ij = d_j − d_i for all measured pairs by
 * least squares with d_0 = 0, drop pairs whose residual exceeds the limit, solve again. Dropped pairs
 * with the smallest residuals are taken back when needed to keep every segment linked to segment 0.
 */
export function solveSegmentDrift(
  pairs: PairShifts,
  segments: number,
  residualLimitNm: number,
): SolvedDrift {
  const measured = new Uint8Array(pairs.dx.length)
  for (let p = 0; p < measured.length; p++) {
    measured[p] =
      Number.isFinite(pairs.dx[p] ?? Number.NaN) && Number.isFinite(pairs.dy[p] ?? Number.NaN)
        ? 1
        : 0
  }
  const first = leastSquares(pairs, measured, segments)
  const residuals = pairResiduals(pairs, first)
  const used = new Uint8Array(measured.length)
  for (let p = 0; p < used.length; p++)
    used[p] = measured[p] && (residuals[p] ?? Infinity) <= residualLimitNm ? 1 : 0
  restoreConnectivity(pairs, measured, used, residuals, segments)
  const solved = leastSquares(pairs, used, segments)
  const final = pairResiduals(pairs, solved)
  let [count, squares] = [0, 0]
  for (let p = 0; p < used.length; p++) {
    if (!used[p]) continue
    count++
    squares += (final[p] ?? 0) ** 2
  }
  return {
    ...solved,
    pairsUsed: count,
    pairsDropped: used.length - count,
    rmsResidualNm: count > 0 ? Math.sqrt(squares / count) : Number.NaN,
    connected: componentRoots(pairs, used, segments).every((root) => root === 0),
  }
}

/** Normal equations of the graph (a Laplacian without row and column 0), solved by Cholesky. */
function leastSquares(pairs: PairShifts, use: Uint8Array, segments: number) {
  const n = segments - 1
  const matrix = new Float64Array(n * n)
  const rhsX = new Float64Array(n)
  const rhsY = new Float64Array(n)
  for (let p = 0; p < use.length; p++) {
    if (!use[p]) continue
    const i = (pairs.first[p] ?? 0) - 1
    const j = (pairs.second[p] ?? 0) - 1
    const [dx, dy] = [pairs.dx[p] ?? 0, pairs.dy[p] ?? 0]
    if (i >= 0) addAt(matrix, i * n + i, 1)
    addAt(matrix, j * n + j, 1)
    if (i >= 0) addAt(matrix, i * n + j, -1)
    if (i >= 0) addAt(matrix, j * n + i, -1)
    addAt(rhsX, j, dx)
    addAt(rhsY, j, dy)
    if (i >= 0) addAt(rhsX, i, -dx)
    if (i >= 0) addAt(rhsY, i, -dy)
  }
  // A segment with no pair has a zero row; a unit diagonal pins its drift at 0 rather than failing.
  for (let k = 0; k < n; k++) if ((matrix[k * n + k] ?? 0) === 0) matrix[k * n + k] = 1
  const factor = cholesky(matrix, n)
  const x = new Float64Array(segments)
  const y = new Float64Array(segments)
  x.set(choleskySolve(factor, rhsX, n), 1)
  y.set(choleskySolve(factor, rhsY, n), 1)
  return { x, y }
}

function addAt(array: Float64Array, index: number, value: number) {
  array[index] = (array[index] ?? 0) + value
}

function pairResiduals(pairs: PairShifts, drift: { x: Float64Array; y: Float64Array }) {
  const residuals = new Float64Array(pairs.dx.length)
  for (let p = 0; p < residuals.length; p++) {
    const [i, j] = [pairs.first[p] ?? 0, pairs.second[p] ?? 0]
    const ex = (pairs.dx[p] ?? 0) - ((drift.x[j] ?? 0) - (drift.x[i] ?? 0))
    const ey = (pairs.dy[p] ?? 0) - ((drift.y[j] ?? 0) - (drift.y[i] ?? 0))
    residuals[p] = Math.hypot(ex, ey)
  }
  return residuals
}

/** Takes back measured, dropped pairs (smallest residual first) that join separate components. */
function restoreConnectivity(
  pairs: PairShifts,
  measured: Uint8Array,
  used: Uint8Array,
  residuals: Float64Array,
  segments: number,
) {
  const dropped: number[] = []
  for (let p = 0; p < used.length; p++) if (measured[p] && !used[p]) dropped.push(p)
  dropped.sort((a, b) => (residuals[a] ?? 0) - (residuals[b] ?? 0))
  const roots = componentRoots(pairs, used, segments)
  for (const p of dropped) {
    const a = roots[pairs.first[p] ?? 0] ?? 0
    const b = roots[pairs.second[p] ?? 0] ?? 0
    if (a === b) continue
    used[p] = 1
    const [keep, merge] = a < b ? [a, b] : [b, a]
    for (let k = 0; k < roots.length; k++) if (roots[k] === merge) roots[k] = keep
  }
}

/** Smallest segment index of each segment's connected component over the used pairs. */
function componentRoots(pairs: PairShifts, used: Uint8Array, segments: number): number[] {
  const roots = Array.from({ length: segments }, (_, k) => k)
  for (let changed = true; changed;) {
    changed = false
    for (let p = 0; p < used.length; p++) {
      if (!used[p]) continue
      const [i, j] = [pairs.first[p] ?? 0, pairs.second[p] ?? 0]
      const low = Math.min(roots[i] ?? i, roots[j] ?? j)
      if (roots[i] !== low || roots[j] !== low) {
        roots[i] = low
        roots[j] = low
        changed = true
      }
    }
  }
  return roots
}

function cholesky(matrix: Float64Array, n: number): Float64Array {
  const lower = new Float64Array(n * n)
  for (let j = 0; j < n; j++) {
    let diagonal = matrix[j * n + j] ?? 0
    for (let k = 0; k < j; k++) diagonal -= (lower[j * n + k] ?? 0) ** 2
    const pivot = Math.sqrt(Math.max(diagonal, 1e-12))
    lower[j * n + j] = pivot
    for (let i = j + 1; i < n; i++) {
      let sum = matrix[i * n + j] ?? 0
      for (let k = 0; k < j; k++) sum -= (lower[i * n + k] ?? 0) * (lower[j * n + k] ?? 0)
      lower[i * n + j] = sum / pivot
    }
  }
  return lower
}

function choleskySolve(lower: Float64Array, rhs: Float64Array, n: number): Float64Array {
  const z = new Float64Array(n)
  for (let i = 0; i < n; i++) {
    let sum = rhs[i] ?? 0
    for (let k = 0; k < i; k++) sum -= (lower[i * n + k] ?? 0) * (z[k] ?? 0)
    z[i] = sum / (lower[i * n + i] ?? 1)
  }
  for (let i = n - 1; i >= 0; i--) {
    let sum = z[i] ?? 0
    for (let k = i + 1; k < n; k++) sum -= (lower[k * n + i] ?? 0) * (z[k] ?? 0)
    z[i] = sum / (lower[i * n + i] ?? 1)
  }
  return z
}
