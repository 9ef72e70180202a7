/** Small builders shared by the render tests. */
import type { Localizations } from '../../../../server/compute/localizations.types'
import { createRandom } from '../../../fixtures/spot-simulation'

export function tableOf(columns: {
  x: number[]
  y: number[]
  frame?: number[]
  z?: number[]
  uncertainty?: number[]
  channel?: number[]
}): Localizations {
  const n = columns.x.length
  const locs: Localizations = {
    count: n,
    x: Float64Array.from(columns.x),
    y: Float64Array.from(columns.y),
    frame: Float64Array.from(columns.frame ?? new Array<number>(n).fill(0)),
  }
  if (columns.z) locs.z = Float64Array.from(columns.z)
  if (columns.uncertainty) locs.uncertainty = Float64Array.from(columns.uncertainty)
  if (columns.channel) locs.channel = Uint8Array.from(columns.channel)
  return locs
}

/** n uniformly random localizations in [x0, x1) × [y0, y1), fixed seed. */
export function randomTable(
  n: number,
  seed: number,
  box: { x0: number; x1: number; y0: number; y1: number },
): Localizations {
  const random = createRandom(seed)
  const x = new Float64Array(n)
  const y = new Float64Array(n)
  const frame = new Uint32Array(n)
  const uncertainty = new Float32Array(n)
  const channel = new Uint8Array(n)
  for (let i = 0; i < n; i++) {
    x[i] = box.x0 + random() * (box.x1 - box.x0)
    y[i] = box.y0 + random() * (box.y1 - box.y0)
    frame[i] = Math.floor(random() * 1000)
    uncertainty[i] = 3 + random() * 27
    channel[i] = random() < 0.5 ? 0 : 1
  }
  return { count: n, x, y, frame, uncertainty, channel }
}

export function sum(image: ArrayLike<number>): number {
  let total = 0
  for (let i = 0; i < image.length; i++) total += image[i]!
  return total
}
