// @vitest-environment node
import { describe, expect, it } from 'vitest'
import { FRC_THRESHOLD, thresholdCrossing } from '../../../../server/compute/frc/threshold'

function ringFrequencies(size: number, pixelNm: number): number[] {
  return Array.from({ length: size / 2 + 1 }, (_, k) => k / (size * pixelNm))
}

describe('threshold crossing', () => {
  // Source: DOMAIN.md §1.4/§5 — threshold 1/7 = 0.142857 (Nieuwenhuizen 2013).
  it('uses 1/7', () => {
    expect(FRC_THRESHOLD).toBeCloseTo(0.142857, 6)
  })

  // Source: DOMAIN.md §1.4 arithmetic check [S]: L = 1024, 5 nm pixels, crossing at ring 160
  // → 1024·5/160 = 32 nm. The curve is a straight line through 1/7 exactly at ring 160.
  it('turns a crossing at ring 160 of a 1024 grid at 5 nm into 32 nm', () => {
    const q = ringFrequencies(1024, 5)
    const curve = q.map((_, k) => FRC_THRESHOLD + (160 - k) * 0.001)
    const crossing = thresholdCrossing(curve, q)
    expect(crossing).not.toBeNull()
    expect(1 / crossing!).toBeCloseTo(32, 9)
  })

  // Source: linear interpolation between the two rings around the crossing (by hand:
  // 0.2 → 0.1 between rings 10 and 11; 1/7 lies 4/7 of the way, q = (10 + 4/7)/(64·10)).
  it('interpolates between rings', () => {
    const q = ringFrequencies(64, 10)
    const curve = q.map((_, k) => (k <= 10 ? 0.2 : 0.1))
    expect(thresholdCrossing(curve, q)).toBeCloseTo((10 + 4 / 7) / 640, 12)
  })

  // Source: DOMAIN.md §1.4 — only a decreasing crossing counts; none below Nyquist → not a number.
  // By hand: 0.5 at ring 19, 0.05 at ring 20; 1/7 lies (0.5 − 1/7)/0.45 of the way.
  it('skips a rising crossing and reports none when the curve stays above', () => {
    const q = ringFrequencies(64, 10)
    const risesThenFalls = q.map((_, k) => (k < 3 ? 0.05 : k < 20 ? 0.5 : 0.05))
    const ring = 19 + (0.5 - 1 / 7) / 0.45
    expect(1 / thresholdCrossing(risesThenFalls, q)!).toBeCloseTo(640 / ring, 9)
    expect(
      thresholdCrossing(
        q.map(() => 0.5),
        q,
      ),
    ).toBeNull()
  })
})
