/**
 * DBSCAN (Ester, Kriegel, Sander & Xu 1996, KDD): a point with at least minPts points within eps
 * (the point itself counted, distance ≤ eps) is a core point; clusters are the core points
 * reachable from one another plus the points within eps of them (border points, which join the
 * first cluster that reaches them); the rest is noise. Neighbourhoods come from a grid of eps-sized
 * cells: a point's neighbours are in the 3 × 3 cells around it.
 */
import { convexHull, polygonArea } from './convex-hull'
import { MeasurementLimitError, REGION_LIMITS } from './limits'
import { cellGrid } from './cell-grid'

export interface DbscanParams {
  eps: number
  minPts: number
}

export interface DbscanCluster {
  size: number
  /** Area of the cluster's convex hull, nm². */
  area: number
  centroid: [number, number]
  /** Convex hull, counter-clockwise, nm (for drawing the cluster back on the preview). */
  hull: [number, number][]
}

export interface DbscanResult {
  /** Cluster number per point (0, 1, …), −1 for noise. */
  labels: Int32Array
  clusters: DbscanCluster[]
  noise: number
}

const NOISE = -1

export function checkDbscanParams(count: number, area: number, { eps, minPts }: DbscanParams) {
  if (count > REGION_LIMITS.maxClusteringPoints)
    throw new MeasurementLimitError(
      `DBSCAN takes at most ${REGION_LIMITS.maxClusteringPoints.toLocaleString('en')} localizations; this region holds ${count.toLocaleString('en')}.`,
    )
  const meanNeighbours = area > 0 ? (count / area) * Math.PI * eps * eps : 0
  if (meanNeighbours > REGION_LIMITS.maxMeanNeighbours)
    throw new MeasurementLimitError(
      `eps = ${eps} nm gives about ${Math.round(meanNeighbours).toLocaleString('en')} neighbours per localization here; at most ${REGION_LIMITS.maxMeanNeighbours.toLocaleString('en')} are allowed. Use a smaller eps.`,
    )
  if (!Number.isInteger(minPts) || minPts < 1)
    throw new MeasurementLimitError('minPts is a whole number of at least 1.')
}

export function dbscan(
  x: ArrayLike<number>,
  y: ArrayLike<number>,
  count: number,
  { eps, minPts }: DbscanParams,
): DbscanResult {
  // Cells of side eps: every neighbour of a point lies in the 3 × 3 cells around it.
  const g = cellGrid(x, y, count, eps)
  const { xs, ys, start, columns, rows } = g
  const eps2 = eps * eps
  const cellX = (s: number) => Math.floor((xs[s]! - g.x0) / g.cell)
  const cellY = (s: number) => Math.floor((ys[s]! - g.y0) / g.cell)
  // Core points first: counting stops at minPts (written out: the hottest loop of the measurement).
  const core = new Uint8Array(count)
  for (let s = 0; s < count; s++) {
    const px = xs[s]!
    const py = ys[s]!
    const cx = cellX(s)
    const cy = cellY(s)
    let n = 0
    scan: for (let j = Math.max(0, cy - 1); j <= Math.min(rows - 1, cy + 1); j++)
      for (let i = Math.max(0, cx - 1); i <= Math.min(columns - 1, cx + 1); i++) {
        const c = j * columns + i
        const end = start[c + 1]!
        for (let t = start[c]!; t < end; t++) {
          const dx = xs[t]! - px
          const dy = ys[t]! - py
          if (dx * dx + dy * dy <= eps2 && ++n >= minPts) break scan
        }
      }
    if (n >= minPts) core[s] = 1
  }
  // Clusters grow from core points through core points; non-core points reached are borders.
  const sortedLabels = new Int32Array(count).fill(NOISE)
  const queue = new Uint32Array(count)
  let clusterCount = 0
  for (let s = 0; s < count; s++) {
    if (!core[s] || sortedLabels[s] !== NOISE) continue
    const c = clusterCount++
    sortedLabels[s] = c
    let head = 0
    let tail = 0
    queue[tail++] = s
    while (head < tail) {
      const q = queue[head++]!
      const px = xs[q]!
      const py = ys[q]!
      const cx = cellX(q)
      const cy = cellY(q)
      for (let j = Math.max(0, cy - 1); j <= Math.min(rows - 1, cy + 1); j++)
        for (let i = Math.max(0, cx - 1); i <= Math.min(columns - 1, cx + 1); i++) {
          const cellNo = j * columns + i
          const end = start[cellNo + 1]!
          for (let t = start[cellNo]!; t < end; t++) {
            if (sortedLabels[t] !== NOISE) continue
            const dx = xs[t]! - px
            const dy = ys[t]! - py
            if (dx * dx + dy * dy > eps2) continue
            sortedLabels[t] = c
            if (core[t]) queue[tail++] = t
          }
        }
    }
  }
  const labels = new Int32Array(count)
  for (let s = 0; s < count; s++) labels[g.order[s]!] = sortedLabels[s]!
  return { labels, ...summarizeClusters(x, y, labels, clusterCount) }
}

function summarizeClusters(
  x: ArrayLike<number>,
  y: ArrayLike<number>,
  labels: Int32Array,
  clusterCount: number,
) {
  const sizes = new Uint32Array(clusterCount)
  const sx = new Float64Array(clusterCount)
  const sy = new Float64Array(clusterCount)
  let noise = 0
  for (let i = 0; i < labels.length; i++) {
    const c = labels[i]!
    if (c < 0) {
      noise++
      continue
    }
    sizes[c]!++
    sx[c]! += x[i]!
    sy[c]! += y[i]!
  }
  // Member lists through one counting sort instead of an array per cluster.
  const starts = new Uint32Array(clusterCount + 1)
  for (let c = 0; c < clusterCount; c++) starts[c + 1] = starts[c]! + sizes[c]!
  const members = new Uint32Array(labels.length - noise)
  const fill = starts.slice(0, clusterCount)
  for (let i = 0; i < labels.length; i++) {
    const c = labels[i]!
    if (c >= 0) members[fill[c]!++] = i
  }
  const clusters: DbscanCluster[] = []
  for (let c = 0; c < clusterCount; c++) {
    const hull = convexHull(x, y, members.subarray(starts[c]!, starts[c + 1]!))
    clusters.push({
      size: sizes[c]!,
      area: polygonArea(hull),
      centroid: [sx[c]! / sizes[c]!, sy[c]! / sizes[c]!],
      hull,
    })
  }
  return { clusters, noise }
}
