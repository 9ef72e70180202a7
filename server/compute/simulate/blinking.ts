/**
 * When each emitter is seen: a number of bursts per emitter, each a run of consecutive frames of
 * geometric length, starting at random frames so re-blinking spreads across the run.
 */
import { SIMULATION_DEFAULTS as D, type Blinking } from './options'
import type { Random } from './random'

export interface Bursts {
  count: number
  /** Emitter of each burst. */
  emitter: Uint32Array
  firstFrame: Uint32Array
  /** Length in frames (cut at the end of the run). Bursts are sorted by first frame. */
  frames: Uint32Array
}

class BurstList {
  count = 0
  emitter: Uint32Array
  firstFrame: Uint32Array
  frames: Uint32Array

  constructor(capacity: number) {
    this.emitter = new Uint32Array(capacity)
    this.firstFrame = new Uint32Array(capacity)
    this.frames = new Uint32Array(capacity)
  }

  push(emitter: number, firstFrame: number, frames: number): void {
    if (this.count === this.emitter.length) this.grow()
    this.emitter[this.count] = emitter
    this.firstFrame[this.count] = firstFrame
    this.frames[this.count] = frames
    this.count++
  }

  private grow(): void {
    const capacity = 2 * this.emitter.length + 16
    const grown = (from: Uint32Array) => {
      const to = new Uint32Array(capacity)
      to.set(from)
      return to
    }
    this.emitter = grown(this.emitter)
    this.firstFrame = grown(this.firstFrame)
    this.frames = grown(this.frames)
  }

  /** The bursts sorted by first frame (a stable counting sort), so rows can be laid out in order. */
  finish(runFrames: number): Bursts {
    const n = this.count
    const starts = new Float64Array(runFrames + 1)
    for (let b = 0; b < n; b++) {
      const next = (this.firstFrame[b] ?? 0) + 1
      starts[next] = (starts[next] ?? 0) + 1
    }
    for (let f = 0; f < runFrames; f++) starts[f + 1] = (starts[f + 1] ?? 0) + (starts[f] ?? 0)
    const sorted = { count: n, emitter: new Uint32Array(n), firstFrame: new Uint32Array(n) }
    const frames = new Uint32Array(n)
    for (let b = 0; b < n; b++) {
      const first = this.firstFrame[b] ?? 0
      const to = starts[first] ?? 0
      starts[first] = to + 1
      sorted.emitter[to] = this.emitter[b] ?? 0
      sorted.firstFrame[to] = first
      frames[to] = this.frames[b] ?? 0
    }
    return { ...sorted, frames }
  }
}

/** A start frame in [0, frames): uniform, or exponential with mean `decay` cut at the run's end. */
function startFrame(random: Random, frames: number, decay: number | undefined): number {
  if (decay === undefined || !(decay > 0)) return random.integer(frames)
  const keep = 1 - Math.exp(-frames / decay)
  const frame = Math.floor(-decay * Math.log(1 - random.uniform() * keep))
  return Math.min(frames - 1, frame)
}

/** The bursts of `emitters` emitters over a run of `frames` frames. */
export function generateBursts(
  emitters: number,
  frames: number,
  blinking: Blinking,
  random: Random,
): Bursts {
  if (blinking.mode === 'single') {
    const list = new BurstList(emitters)
    for (let e = 0; e < emitters; e++) list.push(e, random.integer(frames), 1)
    return list.finish(frames)
  }
  const meanBursts = Math.max(1, blinking.meanBursts ?? D.meanBursts)
  const meanFrames = Math.max(1, blinking.meanBurstFrames ?? D.meanBurstFrames)
  const list = new BurstList(Math.ceil(emitters * meanBursts * 1.1) + 16)
  for (let e = 0; e < emitters; e++) {
    const bursts = 1 + random.poisson(meanBursts - 1)
    for (let b = 0; b < bursts; b++) {
      const first = startFrame(random, frames, blinking.decayFrames)
      const length = Math.min(random.geometric(meanFrames), frames - first)
      list.push(e, first, length)
    }
  }
  return list.finish(frames)
}
