import { describe, expect, it } from 'vitest'
import { thompsonPrecisionNm } from '@shared/domain/optics'
import { simulateLocalizations, type SimulatedTable } from '@server/compute/simulate'

/** Standardized lateral error: (x − true x − drift) / uncertainty, both axes pooled. */
function standardizedErrorSd(sim: SimulatedTable): number {
  const { localizations: table, truth } = sim
  let sumSquares = 0
  for (let row = 0; row < table.count; row++) {
    const e = truth.emitterId[row] ?? 0
    const f = table.frame[row] ?? 0
    const u = table.uncertainty?.[row] ?? NaN
    const dx = (table.x[row] ?? 0) - (truth.emitters.x[e] ?? 0) - (truth.drift?.x[f] ?? 0)
    const dy = (table.y[row] ?? 0) - (truth.emitters.y[e] ?? 0) - (truth.drift?.y[f] ?? 0)
    sumSquares += (dx / u) ** 2 + (dy / u) ** 2
  }
  return Math.sqrt(sumSquares / (2 * table.count))
}

describe('simulateLocalizations: table shape and determinism', () => {
  const small = { emitters: 2000, frames: 2000 }

  it('gives the same table for the same seed and another for another seed', () => {
    const a = simulateLocalizations({ ...small, seed: 9 })
    const b = simulateLocalizations({ ...small, seed: 9 })
    const c = simulateLocalizations({ ...small, seed: 10 })
    expect(b.localizations).toEqual(a.localizations)
    expect(b.truth).toEqual(a.truth)
    expect(c.localizations.x).not.toEqual(a.localizations.x)
  })

  it('sorts rows by frame, fills every column and keeps frames inside the run', () => {
    const { localizations: table, truth } = simulateLocalizations(small)
    expect(table.count).toBeGreaterThan(0)
    for (const column of [table.x, table.y, table.photons, table.background, table.sigma]) {
      expect(column?.length).toBe(table.count)
    }
    expect(truth.emitterId.length).toBe(table.count)
    expect(truth.burstId.length).toBe(table.count)
    for (let row = 1; row < table.count; row++) {
      expect(table.frame[row] ?? 0).toBeGreaterThanOrEqual(table.frame[row - 1] ?? 0)
    }
    expect(table.frame[table.count - 1]).toBeLessThan(2000)
    expect(table.z).toBeUndefined()
    expect(table.channel).toBeUndefined()
  })

  it('turns a density into an emitter count over the field', () => {
    // 100 per µm² over 5 × 5 µm: 2500 emitters (arithmetic).
    const { truth } = simulateLocalizations({ densityPerUm2: 100, fieldNm: 5000, frames: 100 })
    expect(truth.emitters.x.length).toBe(2500)
  })
})

describe('localization error follows each row’s own precision (ground truth, fixed seed)', () => {
  it('Thompson mode: the uncertainty column is Thompson 2002 of the row’s photons and background', () => {
    const sim = simulateLocalizations({ emitters: 5000, seed: 11, psfSigmaNm: 120, pixelNm: 100 })
    const table = sim.localizations
    for (let row = 0; row < 2000; row++) {
      const expected = thompsonPrecisionNm({
        s: 120,
        a: 100,
        n: table.photons?.[row] ?? NaN,
        b2: table.background?.[row] ?? NaN,
      })
      expect((table.uncertainty?.[row] ?? 0) / expected).toBeCloseTo(1, 5)
    }
    // SD of a standardized normal over ~60 000 × 2 draws: 1 ± 0.003 (1 SE); allow 2 %.
    expect(standardizedErrorSd(sim)).toBeCloseTo(1, 1)
    expect(Math.abs(standardizedErrorSd(sim) - 1)).toBeLessThan(0.02)
  })

  it('fixed mode: SD of x − true x equals the fixed precision, 3D z error is 2.5× it', () => {
    const sim = simulateLocalizations({
      emitters: 5000,
      seed: 12,
      precision: { mode: 'fixed', sigmaNm: 8 },
      axial: { rangeNm: [-300, 300] },
    })
    const { localizations: table, truth } = sim
    expect(Math.abs(standardizedErrorSd(sim) - 1)).toBeLessThan(0.02)
    let sumSquares = 0
    for (let row = 0; row < table.count; row++) {
      const dz = (table.z?.[row] ?? 0) - (truth.emitters.z?.[truth.emitterId[row] ?? 0] ?? 0)
      sumSquares += dz * dz
    }
    expect(new Set(table.uncertainty)).toEqual(new Set([8]))
    // The brief's astigmatic-like default: axial precision 2.5× the lateral one.
    expect(Math.sqrt(sumSquares / table.count) / (2.5 * 8)).toBeGreaterThan(0.98)
    expect(Math.sqrt(sumSquares / table.count) / (2.5 * 8)).toBeLessThan(1.02)
  })
})

describe('blinking', () => {
  it('bursts have the requested mean length, run over consecutive frames, and belong to one emitter', () => {
    // Long run so cutting bursts at its end is negligible.
    const sim = simulateLocalizations({
      emitters: 20_000,
      frames: 100_000,
      seed: 13,
      blinking: { mode: 'bursts', meanBursts: 3, meanBurstFrames: 4 },
    })
    const { localizations: table, truth } = sim
    const rowsPerBurst = new Uint32Array(truth.bursts.count)
    let outsideBurst = 0
    let wrongEmitter = 0
    for (let row = 0; row < table.count; row++) {
      const b = truth.burstId[row] ?? 0
      const offset = (table.frame[row] ?? 0) - (truth.bursts.firstFrame[b] ?? 0)
      if (offset < 0 || offset >= (truth.bursts.frames[b] ?? 0)) outsideBurst++
      if (truth.emitterId[row] !== truth.bursts.emitter[b]) wrongEmitter++
      rowsPerBurst[b] = (rowsPerBurst[b] ?? 0) + 1
    }
    expect(outsideBurst).toBe(0)
    expect(wrongEmitter).toBe(0)
    // Every frame of a burst has its row: row counts equal burst lengths.
    expect(rowsPerBurst).toEqual(truth.bursts.frames)
    const total = table.count
    // Geometric with mean 4: SD √12 ≈ 3.5; over ~60 000 bursts the SE is 0.014.
    expect(total / truth.bursts.count).toBeCloseTo(4, 1)
    // 1 + Poisson(2) bursts per emitter: mean 3, SE ≈ 0.01 over 20 000 emitters.
    expect(truth.bursts.count / 20_000).toBeCloseTo(3, 1)
  })

  it('one-localization mode gives every emitter exactly one row', () => {
    const { localizations: table, truth } = simulateLocalizations({
      emitters: 3000,
      blinking: { mode: 'single' },
    })
    expect(table.count).toBe(3000)
    expect(Array.from(truth.emitterId).sort((a, b) => a - b)).toEqual(
      Array.from({ length: 3000 }, (_, i) => i),
    )
  })
})

describe('drift', () => {
  const base = { emitters: 3000, frames: 500, seed: 14 }

  it('is added exactly: drift does not change the random stream', () => {
    const at = (frame: number) => ({ x: 0.1 * frame, y: 20 * Math.cos(frame / 50) })
    const plain = simulateLocalizations(base).localizations
    const drifted = simulateLocalizations({ ...base, drift: at })
    const table = drifted.localizations
    let largestMismatch = 0
    for (let row = 0; row < table.count; row++) {
      const f = table.frame[row] ?? 0
      const { x, y } = at(f)
      largestMismatch = Math.max(
        largestMismatch,
        Math.abs((table.x[row] ?? 0) - (plain.x[row] ?? 0) - x),
        Math.abs((table.y[row] ?? 0) - (plain.y[row] ?? 0) - y),
        Math.abs((drifted.truth.drift?.x[f] ?? NaN) - x),
      )
    }
    // Only floating-point rounding of positions around 10 µm (about 1e-12 nm).
    expect(largestMismatch).toBeLessThan(1e-9)
  })

  it('linear + sinusoid parameters: 0 at frame 0, the linear total at the last frame', () => {
    const { truth } = simulateLocalizations({
      ...base,
      drift: {
        linearNm: { x: 50, y: -30 },
        sinusoidAmplitudeNm: { x: 20, y: 0 },
        sinusoidPeriodFrames: 200,
      },
    })
    expect(truth.drift?.x[0]).toBeCloseTo(0, 12)
    // Frame 499: 50 nm linear + 20·sin(2π·499/200) (arithmetic).
    expect(truth.drift?.x[499]).toBeCloseTo(50 + 20 * Math.sin((2 * Math.PI * 499) / 200), 9)
    expect(truth.drift?.y[499]).toBeCloseTo(-30, 9)
    // Frame 50: a quarter period, sinusoid at its peak.
    expect(truth.drift?.x[50]).toBeCloseTo((50 * 50) / 499 + 20, 9)
  })
})
