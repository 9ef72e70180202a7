/**
 * DBSCAN (Ester, Kriegel, Sander & Xu 1996, KDD): a point with at least minPts points within eps
 * (the point itself counted, distance ≤ eps) is a core point; clusters are the core points
 * reachable from one another plus the points within eps of them (border points, which join the
 * first cluster that reaches them); the rest is noise. Neighbourhoods come from a k-d tree, so
 * each point costs one radius query.
 */
import { convexHull, polygonArea } from './convex-hull'
import { MeasurementLimitError, REGION_LIMITS } from './limits'
import { pointIndex } from './point-index'

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

const UNVISITED = -2
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
  const labels = new Int32Array(count).fill(UNVISITED)
  const index = pointIndex(x, y, count)
  let queue = new Int32Array(1024)
  let clusterCount = 0
  for (let p = 0; p < count; p++) {
    if (labels[p] !== UNVISITED) continue
    const seeds = index.within(x[p]!, y[p]!, eps)
    if (seeds.length < minPts) {
      labels[p] = NOISE
      continue
    }
    const c = clusterCount++
    labels[p] = c
    let head = 0
    let tail = 0
    const push = (ids: number[]) => {
      if (tail + ids.length > queue.length) {
        const grown = new Int32Array(Math.max(queue.length * 2, tail + ids.length))
        grown.set(queue.subarray(0, tail))
        queue = grown
      }
      for (const id of ids) queue[tail++] = id
    }
    push(seeds)
    while (head < tail) {
      const q = queue[head++]!
      if (labels[q] === NOISE) labels[q] = c // a border point
      if (labels[q] !== UNVISITED) continue
      labels[q] = c
      const around = index.within(x[q]!, y[q]!, eps)
      if (around.length >= minPts) push(around)
    }
  }
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
