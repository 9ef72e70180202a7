import { describe, expect, it } from 'vitest'
import { Random, createRandom, logFactorial } from '@server/compute/simulate/random'

/** Sample mean and (n − 1) variance of n draws. */
function moments(draw: () => number, n: number): { mean: number; variance: number } {
  let sum = 0
  let sumSquares = 0
  for (let i = 0; i < n; i++) {
    const v = draw()
    sum += v
    sumSquares += v * v
  }
  const mean = sum / n
  return { mean, variance: (sumSquares - n * mean * mean) / (n - 1) }
}

describe('xoshiro128** against its reference implementation', () => {
  // Outputs and states of the public-domain C reference (xoshiro128starstar.c, version 1.1)
  // from a given state, as recorded in the test data of an independent 6502 port
  // (github.com/edorfaus/xoshiro-6502, test-rom/testdata.asm: VerifyValuesXoshiro128 and
  // VerifyStatesXoshiro128, "the same data that was used to initialize the C reference").
  const start: [number, number, number, number] = [0x964d4a0c, 0xd40ab895, 0xad7fdecb, 0x3006f0f0]
  const outputs = [0xf1391922, 0x6fe53806, 0xa5be2840, 0xf510ee70]
  const states = [
    [0x72410269, 0xef382c52, 0x2e43bec7, 0x62432f20],
    [0xff3a011b, 0xb33a90fc, 0x2c5a18ae, 0xd81b946b],
    [0x941b058c, 0x605a8949, 0xa641e1b5, 0x0824bb59],
    [0xfc65379c, 0x52006d70, 0x87487639, 0xf1908343],
  ]

  it('gives the reference outputs and states', () => {
    const random = Random.fromState(...start)
    for (let i = 0; i < outputs.length; i++) {
      expect(random.nextUint32()).toBe(outputs[i])
      expect(random.state()).toEqual(states[i])
    }
  })
})

describe('seeding', () => {
  it('repeats a stream for a seed and differs between seeds', () => {
    const a = createRandom(42)
    const b = createRandom(42)
    const c = createRandom(43)
    const first = Array.from({ length: 8 }, () => a.nextUint32())
    expect(Array.from({ length: 8 }, () => b.nextUint32())).toEqual(first)
    expect(Array.from({ length: 8 }, () => c.nextUint32())).not.toEqual(first)
  })

  it('never seeds an all-zero state', () => {
    for (let seed = 0; seed < 1000; seed++) {
      expect(
        createRandom(seed)
          .state()
          .some((word) => word !== 0),
      ).toBe(true)
    }
  })
})

// Moments: tolerances are 5 standard errors of the estimate for the fixed seed (textbook
// variances of the sample mean, σ²/n, and of the sample variance, (μ₄ − σ⁴)/n).
describe('variates match their distributions', () => {
  const n = 200_000

  it('uniform on [0, 1): mean 1/2, variance 1/12', () => {
    const random = createRandom(1)
    const { mean, variance } = moments(() => random.uniform(), n)
    expect(Math.abs(mean - 0.5)).toBeLessThan(5 * Math.sqrt(1 / 12 / n))
    expect(Math.abs(variance - 1 / 12)).toBeLessThan(5 * Math.sqrt((1 / 80 - 1 / 144) / n))
  })

  it('standard normal: mean 0, variance 1, 4.55 % beyond ±2 (normal table)', () => {
    const random = createRandom(2)
    let beyond = 0
    const { mean, variance } = moments(() => {
      const v = random.normal()
      if (Math.abs(v) > 2) beyond++
      return v
    }, n)
    expect(Math.abs(mean)).toBeLessThan(5 / Math.sqrt(n))
    expect(Math.abs(variance - 1)).toBeLessThan(5 * Math.sqrt(2 / n))
    expect(Math.abs(beyond / n - 0.0455)).toBeLessThan(5 * Math.sqrt((0.0455 * 0.9545) / n))
  })

  it.each([0.5, 4, 25, 50, 1000])('Poisson mean %d: mean and variance both equal it', (mu) => {
    const random = createRandom(3)
    const { mean, variance } = moments(() => random.poisson(mu), n)
    expect(Math.abs(mean - mu)).toBeLessThan(5 * Math.sqrt(mu / n))
    // Poisson central moments: μ₄ = μ(1 + 3μ), so var(s²) ≈ (μ + 2μ²)/n.
    expect(Math.abs(variance - mu)).toBeLessThan(5 * Math.sqrt((mu + 2 * mu * mu) / n))
  })

  it.each([4, 50])('Poisson mean %d: frequencies follow e^−μ μ^k / k!', (mu) => {
    const random = createRandom(4)
    const counts = new Map<number, number>()
    for (let i = 0; i < n; i++) {
      const k = random.poisson(mu)
      counts.set(k, (counts.get(k) ?? 0) + 1)
    }
    for (const k of [mu - 3, mu, mu + 5]) {
      let logFact = 0
      for (let j = 2; j <= k; j++) logFact += Math.log(j)
      const p = Math.exp(-mu + k * Math.log(mu) - logFact)
      expect(Math.abs((counts.get(k) ?? 0) / n - p)).toBeLessThan(5 * Math.sqrt((p * (1 - p)) / n))
    }
  })

  it.each([1.5, 3, 10])('geometric mean %d: mean m, variance m(m − 1), minimum 1', (m) => {
    const random = createRandom(5)
    let smallest = Infinity
    const { mean, variance } = moments(() => {
      const v = random.geometric(m)
      smallest = Math.min(smallest, v)
      return v
    }, n)
    const p = 1 / m
    const sd = Math.sqrt((1 - p) / (p * p))
    expect(smallest).toBe(1)
    expect(Math.abs(mean - m)).toBeLessThan((5 * sd) / Math.sqrt(n))
    // Within 5 % (toBeCloseTo to 1 decimal): the heavy tail makes var(s²) large.
    expect(variance / (m * (m - 1))).toBeCloseTo(1, 1)
  })

  it('geometric with mean 1 is always 1', () => {
    const random = createRandom(6)
    for (let i = 0; i < 100; i++) expect(random.geometric(1)).toBe(1)
  })

  it('exponential mean 7: mean 7, variance 49', () => {
    const random = createRandom(7)
    const { mean, variance } = moments(() => random.exponential(7), n)
    expect(Math.abs(mean - 7)).toBeLessThan((5 * 7) / Math.sqrt(n))
    // μ₄ = 9σ⁴ for the exponential, so var(s²) = 8σ⁴/n.
    expect(Math.abs(variance - 49)).toBeLessThan(5 * Math.sqrt((8 * 49 * 49) / n))
  })

  it('log-normal: the median is the given median, ln has the given SD', () => {
    const random = createRandom(8)
    const values = Float64Array.from({ length: n }, () => random.logNormal(1500, 0.5))
    const sorted = Float64Array.from(values).sort()
    expect((sorted[n / 2] ?? 0) / 1500).toBeCloseTo(1, 1)
    const { variance } = moments(
      (() => {
        let i = 0
        return () => Math.log(values[i++] ?? 1)
      })(),
      n,
    )
    expect(Math.sqrt(variance)).toBeCloseTo(0.5, 2)
  })
})

describe('logFactorial', () => {
  it('matches a direct sum of logarithms, in the table and in Stirling’s range', () => {
    for (const k of [0, 1, 2, 10, 255, 256, 300, 5000]) {
      let sum = 0
      for (let j = 2; j <= k; j++) sum += Math.log(j)
      expect(logFactorial(k)).toBeCloseTo(sum, 8)
    }
  })
})
