import { describe, expect, it } from 'vitest'
import { simulateLocalizations } from '@server/compute/simulate'

const few = { frames: 100, blinking: { mode: 'single' as const } }

function mean(values: Float64Array): number {
  let sum = 0
  for (const v of values) sum += v
  return sum / values.length
}

describe('structures (ground truth of the targets)', () => {
  it('uniform: targets fill the field evenly (mean L/2, variance L²/12 of a uniform)', () => {
    const { truth } = simulateLocalizations({
      ...few,
      emitters: 20_000,
      fieldNm: 4000,
      structure: { kind: 'uniform' },
    })
    const x = truth.emitters.targetX
    expect(Math.min(...x)).toBeGreaterThanOrEqual(0)
    expect(Math.max(...x)).toBeLessThanOrEqual(4000)
    expect(mean(x) / 2000).toBeCloseTo(1, 1)
    const variance = mean(x.map((v) => (v - 2000) ** 2))
    expect(variance / (4000 ** 2 / 12)).toBeCloseTo(1, 1)
  })

  it('rings: every site 50 nm from the ring centre, at multiples of 45° (8-fold)', () => {
    const { truth } = simulateLocalizations({
      ...few,
      emitters: 400,
      structure: { kind: 'rings', count: 1, radiusNm: 50, sites: 8, siteSpreadNm: 0 },
    })
    const { targetX: x, targetY: y } = truth.emitters
    // 400 labels fill all 8 sites; the mean of the 8 distinct sites is the ring's centre.
    const sites = new Map<string, [number, number]>()
    x.forEach((v, i) => sites.set(`${v.toFixed(6)},${(y[i] ?? 0).toFixed(6)}`, [v, y[i] ?? 0]))
    expect(sites.size).toBe(8)
    const points = [...sites.values()]
    const cx = points.reduce((a, p) => a + p[0], 0) / 8
    const cy = points.reduce((a, p) => a + p[1], 0) / 8
    const angles = points.map(([px, py]) => Math.atan2(py - cy, px - cx)).sort((a, b) => a - b)
    for (const [px, py] of points) expect(Math.hypot(px - cx, py - cy)).toBeCloseTo(50, 9)
    for (let i = 1; i < 8; i++) {
      expect((angles[i] ?? 0) - (angles[i - 1] ?? 0)).toBeCloseTo(Math.PI / 4, 9)
    }
  })

  it('clusters: one Gaussian cluster has the given radius as its SD', () => {
    const { truth } = simulateLocalizations({
      ...few,
      emitters: 20_000,
      structure: { kind: 'clusters', count: 1, radiusNm: 30 },
    })
    const x = truth.emitters.targetX
    const centre = mean(x)
    const sd = Math.sqrt(mean(x.map((v) => (v - centre) ** 2)))
    // SE of an SD from 20 000 normal draws: 30/√40 000 = 0.15 nm.
    expect(Math.abs(sd - 30)).toBeLessThan(0.75)
  })

  it('mixes structures by weight', () => {
    const { truth } = simulateLocalizations({
      ...few,
      emitters: 1000,
      structure: [
        { kind: 'clusters', weight: 3 },
        { kind: 'uniform', weight: 1 },
      ],
    })
    expect(truth.emitters.x.length).toBe(1000)
  })
})

describe('label linkage (DOMAIN.md §1.12)', () => {
  it('puts each label exactly the linkage distance from its target in 3D', () => {
    const { truth } = simulateLocalizations({ ...few, emitters: 5000, linkageNm: 15, axial: {} })
    const { x, y, z, targetX, targetY, targetZ } = truth.emitters
    let worst = 0
    let projected = 0
    for (let i = 0; i < x.length; i++) {
      const dx = (x[i] ?? 0) - (targetX[i] ?? 0)
      const dy = (y[i] ?? 0) - (targetY[i] ?? 0)
      const dz = (z?.[i] ?? 0) - (targetZ?.[i] ?? 0)
      worst = Math.max(worst, Math.abs(Math.hypot(dx, dy, dz) - 15))
      projected += Math.hypot(dx, dy)
    }
    expect(worst).toBeLessThan(1e-9)
    // A uniformly random 3D direction projects onto the plane with mean length L·π/4
    // (E[sin θ] for cos θ uniform on [−1, 1]; calculus).
    expect(projected / x.length / (15 * (Math.PI / 4))).toBeCloseTo(1, 1)
  })

  it('a 25 nm tube labelled with 15 nm offsets looks 25 + 2·15 = 55 nm wide before blur', () => {
    // DOMAIN.md §1.12 test [P]. A nearly straight filament: its axis is the principal axis of
    // the labels; the apparent diameter is the spread of their distances across it.
    const { truth } = simulateLocalizations({
      ...few,
      emitters: 40_000,
      linkageNm: 15,
      structure: { kind: 'filaments', count: 1, diameterNm: 25, persistenceNm: 1e12 },
    })
    const { x, y } = truth.emitters
    const mx = mean(x)
    const my = mean(y)
    let sxx = 0
    let sxy = 0
    let syy = 0
    for (let i = 0; i < x.length; i++) {
      const dx = (x[i] ?? 0) - mx
      const dy = (y[i] ?? 0) - my
      sxx += dx * dx
      sxy += dx * dy
      syy += dy * dy
    }
    const angle = 0.5 * Math.atan2(2 * sxy, sxx - syy)
    let low = Infinity
    let high = -Infinity
    for (let i = 0; i < x.length; i++) {
      const across = -((x[i] ?? 0) - mx) * Math.sin(angle) + ((y[i] ?? 0) - my) * Math.cos(angle)
      low = Math.min(low, across)
      high = Math.max(high, across)
    }
    expect(Math.abs(high - low - 55)).toBeLessThan(1.5)
  })
})

describe('channels', () => {
  it('labels two structures in two channels with the requested counts', () => {
    const { localizations: table, truth } = simulateLocalizations({
      frames: 200,
      channels: [
        { structure: { kind: 'rings' }, emitters: 800 },
        { structure: { kind: 'filaments' }, emitters: 1200 },
      ],
    })
    const channelOfEmitter = truth.emitters.channel
    expect(channelOfEmitter?.filter((c) => c === 0).length).toBe(800)
    expect(channelOfEmitter?.filter((c) => c === 1).length).toBe(1200)
    let mismatched = 0
    for (let row = 0; row < table.count; row++) {
      if (table.channel?.[row] !== channelOfEmitter?.[truth.emitterId[row] ?? 0]) mismatched++
    }
    expect(mismatched).toBe(0)
  })
})
