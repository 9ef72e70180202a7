import { describe, expect, it } from 'vitest'
import { FWHM_PER_SIGMA, lineProfile, regionShape } from '@server/compute/regions'
import { Random } from '@server/compute/simulate'

/**
 * Filaments along y at the given x positions: each localization sits at the filament's centre
 * plus the filament's own Gaussian width (labels around the tube) plus its localization error.
 * Across a filament the positions are Gaussian with σ = √(width² + precision²), so the profile's
 * FWHM is 2√(2 ln 2)·σ (the Gaussian's half-maximum width).
 */
function filaments(
  centres: number[],
  perFilament: number,
  widthSd: number,
  precision: number,
  seed: number,
) {
  const random = new Random(seed)
  const n = centres.length * perFilament
  const x = new Float64Array(n)
  const y = new Float64Array(n)
  let i = 0
  for (const c of centres)
    for (let k = 0; k < perFilament; k++, i++) {
      x[i] = c + widthSd * random.normal() + precision * random.normal()
      y[i] = random.uniform() * 2000
    }
  return { x, y, n }
}

/** The localizations inside a line region, as the measurement would select them. */
function across(line: [number, number][], width: number, points: ReturnType<typeof filaments>) {
  const band = regionShape({ type: 'LineString', coordinates: line, width })
  const keep = Array.from({ length: points.n }, (_, i) => i).filter((i) =>
    band.contains(points.x[i]!, points.y[i]!),
  )
  return {
    x: Float64Array.from(keep, (i) => points.x[i]!),
    y: Float64Array.from(keep, (i) => points.y[i]!),
    n: keep.length,
  }
}

describe('line profiles across simulated filaments', () => {
  it('one filament: FWHM = 2√(2 ln 2)·σ with σ = √(8² + 10²) nm', () => {
    const sigma = Math.hypot(8, 10)
    const expected = FWHM_PER_SIGMA * sigma
    expect(expected).toBeCloseTo(30.16, 2)
    const line: [number, number][] = [
      [800, 1000],
      [1200, 1000],
    ]
    const inside = across(line, 1000, filaments([1000], 20_000, 8, 10, 3))
    const profile = lineProfile(line, 1000, inside.x, inside.y, inside.n, 2)
    expect(profile.peaks).toHaveLength(1)
    expect(profile.peaks[0]!.position).toBeCloseTo(200, 0)
    expect(Math.abs(profile.peaks[0]!.fwhm / expected - 1)).toBeLessThan(0.03)
    expect(Math.abs(profile.fwhmInterpolated! / expected - 1)).toBeLessThan(0.1)
  })

  it('a diagonal line gives the same width (the profile is along the line, not along x)', () => {
    const sigma = 12
    // Filament along the direction (1, 1)/√2 through (1000, 1000); the line crosses it at right angles.
    const random = new Random(9)
    const n = 20_000
    const x = new Float64Array(n)
    const y = new Float64Array(n)
    for (let i = 0; i < n; i++) {
      const along = (random.uniform() - 0.5) * 2000
      const off = sigma * random.normal()
      x[i] = 1000 + (along - off) * Math.SQRT1_2
      y[i] = 1000 + (along + off) * Math.SQRT1_2
    }
    const line: [number, number][] = [
      [1150, 850],
      [850, 1150],
    ]
    const inside = across(line, 600, { x, y, n })
    const profile = lineProfile(line, 600, inside.x, inside.y, inside.n, 2)
    expect(profile.peaks).toHaveLength(1)
    expect(Math.abs(profile.peaks[0]!.sigma / sigma - 1)).toBeLessThan(0.04)
  })

  it('two filaments 60 nm apart: two peaks, separation 60 ± 3 nm', () => {
    const line: [number, number][] = [
      [700, 1000],
      [1300, 1000],
    ]
    const inside = across(line, 1000, filaments([970, 1030], 10_000, 6, 8, 4))
    const profile = lineProfile(line, 1000, inside.x, inside.y, inside.n, 2)
    expect(profile.peaks).toHaveLength(2)
    expect(Math.abs(profile.peakSeparation! - 60)).toBeLessThan(3)
    expect(Math.abs(profile.peaks[0]!.position - 270)).toBeLessThan(3)
    for (const p of profile.peaks) expect(Math.abs(p.sigma / 10 - 1)).toBeLessThan(0.1)
  })

  it('refuses more bins than its limit, naming it', () => {
    expect(() =>
      lineProfile(
        [
          [0, 0],
          [100_000, 0],
        ],
        10,
        new Float64Array(0),
        new Float64Array(0),
        0,
        1,
      ),
    ).toThrow(/at most 10,000 bins/)
  })
})
