/**
 * True emitter positions: target sites of each channel's structures, then the label's offset from
 * its target (linkage error, DOMAIN.md §1.12).
 */
import {
  DEFAULT_STRUCTURE,
  SIMULATION_DEFAULTS as D,
  type ChannelOptions,
  type SimulationOptions,
  type Structure,
} from './options'
import type { Random } from './random'
import { placeStructure } from './structures'

/** Where the emitters are: nm, with z and channel where the structure has them. */
export interface EmitterPositions {
  x: Float64Array
  y: Float64Array
  z: Float64Array | null
  channel: Uint8Array | null
}

export interface EmitterTruth extends EmitterPositions {
  /** Target sites before the linkage offset (equal to x, y, z when there is none). */
  targetX: Float64Array
  targetY: Float64Array
  targetZ: Float64Array | null
}

function channelList(options: SimulationOptions): ChannelOptions[] {
  if (options.channels && options.channels.length > 0) return options.channels
  return [
    {
      structure: options.structure ?? DEFAULT_STRUCTURE,
      emitters: options.emitters,
      densityPerUm2: options.densityPerUm2,
    },
  ]
}

function emitterCount(channel: ChannelOptions, fieldNm: number): number {
  if (channel.emitters !== undefined) return Math.max(0, Math.round(channel.emitters))
  if (channel.densityPerUm2 !== undefined) {
    return Math.max(0, Math.round((channel.densityPerUm2 * fieldNm * fieldNm) / 1e6))
  }
  return D.emitters
}

/** Splits `total` by weight, rounding by largest remainders so the parts add up exactly. */
export function splitByWeight(total: number, weights: number[]): number[] {
  const sum = weights.reduce((a, w) => a + Math.max(0, w), 0)
  if (!(sum > 0)) return weights.map((_, i) => (i === 0 ? total : 0))
  const exact = weights.map((w) => (total * Math.max(0, w)) / sum)
  const parts = exact.map(Math.floor)
  let left = total - parts.reduce((a, p) => a + p, 0)
  const byRemainder = exact.map((e, i) => ({ i, r: e - Math.floor(e) })).sort((a, b) => b.r - a.r)
  for (const { i } of byRemainder) {
    if (left-- <= 0) break
    parts[i] = (parts[i] ?? 0) + 1
  }
  return parts
}

function addLinkage(truth: EmitterTruth, linkageNm: number, random: Random): void {
  for (let i = 0; i < truth.x.length; i++) {
    // A uniformly random 3D direction: cos θ uniform on [−1, 1], φ uniform.
    const cosTheta = 2 * random.uniform() - 1
    const sinTheta = Math.sqrt(1 - cosTheta * cosTheta)
    const phi = 2 * Math.PI * random.uniform()
    truth.x[i] = (truth.targetX[i] ?? 0) + linkageNm * sinTheta * Math.cos(phi)
    truth.y[i] = (truth.targetY[i] ?? 0) + linkageNm * sinTheta * Math.sin(phi)
    if (truth.z && truth.targetZ) truth.z[i] = (truth.targetZ[i] ?? 0) + linkageNm * cosTheta
  }
}

/** Places every channel's emitters; ids run through the channels in order. */
export function placeEmitters(options: SimulationOptions, random: Random): EmitterTruth {
  const fieldNm = options.fieldNm ?? D.fieldNm
  const channels = channelList(options)
  const counts = channels.map((channel) => emitterCount(channel, fieldNm))
  const total = counts.reduce((a, c) => a + c, 0)
  const zRange = options.axial ? (options.axial.rangeNm ?? D.axialRangeNm) : null
  const targetX = new Float64Array(total)
  const targetY = new Float64Array(total)
  const targetZ = zRange ? new Float64Array(total) : null
  const channelOf = options.channels ? new Uint8Array(total) : null
  let start = 0
  channels.forEach((channel, c) => {
    const structures: Structure[] = [channel.structure].flat()
    const parts = splitByWeight(
      counts[c] ?? 0,
      structures.map((s) => s.weight ?? 1),
    )
    structures.forEach((structure, s) => {
      const count = parts[s] ?? 0
      const targets = { x: targetX, y: targetY, z: targetZ, zRange, fieldNm, start, count }
      placeStructure(structure, targets, random)
      channelOf?.fill(c, start, start + count)
      start += count
    })
  })
  const linkageNm = options.linkageNm ?? D.linkageNm
  if (!(linkageNm > 0)) {
    return { x: targetX, y: targetY, z: targetZ, channel: channelOf, targetX, targetY, targetZ }
  }
  const truth: EmitterTruth = {
    x: new Float64Array(total),
    y: new Float64Array(total),
    z: targetZ ? new Float64Array(total) : null,
    channel: channelOf,
    targetX,
    targetY,
    targetZ,
  }
  addLinkage(truth, linkageNm, random)
  return truth
}
