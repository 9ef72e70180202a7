// @vitest-environment node
import { describe, expect, it } from 'vitest'
import { ProjectionAccumulator } from '@server/compute/raw-stacks/projection.accumulator'
import { sampleTypeOf } from '@server/compute/raw-stacks/strip-samples.decoder'

const uint16 = sampleTypeOf('uint', 16, true, 0)

describe('ProjectionAccumulator', () => {
  it('moves 32-bit partial sums into float64 without losing counts', () => {
    // Frames of 65 535 and 65 534 alternate; 7 frames, flushed every 2: sums known by hand.
    const accumulator = new ProjectionAccumulator(3, 7, uint16, { flushEvery: 2 })
    for (let frame = 0; frame < 7; frame++) {
      const value = frame % 2 ? 65_534 : 65_535
      accumulator.addStrip(Uint16Array.of(value, value, value), 0)
      accumulator.endFrame(frame)
    }
    const mean = (4 * 65_535 + 3 * 65_534) / 7
    expect(Array.from(accumulator.meanProjection(7))).toEqual([mean, mean, mean])
    expect(Array.from(accumulator.maxProjection())).toEqual([65_535, 65_535, 65_535])
    expect(Array.from(accumulator.meanTrace)).toEqual([
      65_535, 65_534, 65_535, 65_534, 65_535, 65_534, 65_535,
    ])
  })

  it('flushes before a 32-bit sum of 16-bit samples could overflow (65 537 frames)', () => {
    // (2^32 − 1) / 65 535 = 65 537 exactly, so 65 537 full-scale frames are the most that fit.
    const accumulator = new ProjectionAccumulator(1, 65_538, uint16)
    const fullScale = Uint16Array.of(65_535)
    for (let frame = 0; frame < 65_538; frame++) {
      accumulator.addStrip(fullScale, 0)
      accumulator.endFrame(frame)
    }
    expect(accumulator.meanProjection(65_538)[0]).toBe(65_535)
  })

  it('keeps signed and float samples in float64 and starts maxima below any value', () => {
    const accumulator = new ProjectionAccumulator(2, 2, sampleTypeOf('int', 16, true, 0))
    accumulator.addStrip(Int16Array.of(-5, -7), 0)
    accumulator.endFrame(0)
    accumulator.addStrip(Int16Array.of(-9, -1), 0)
    accumulator.endFrame(1)
    expect(Array.from(accumulator.maxProjection())).toEqual([-5, -1])
    expect(Array.from(accumulator.meanProjection(2))).toEqual([-7, -4])
    expect(Array.from(accumulator.meanTrace)).toEqual([-6, -5])
  })
})
