/**
 * Seeded pseudo-random numbers for simulations and tests: xoshiro128** 1.1 (Blackman & Vigna 2018,
 * the public-domain reference xoshiro128starstar.c), seeded through SplitMix-style increments and
 * MurmurHash3's 32-bit finaliser so that neighbouring seeds give unrelated streams. Variates are
 * methods on the generator so hot loops avoid closures and per-call allocation.
 */

const TWO_POW_32 = 4294967296
// Below this mean, Knuth's product of uniforms is cheap and exact; above it, Hörmann's PTRS.
const KNUTH_POISSON_LIMIT = 30

function rotl(x: number, k: number): number {
  return (x << k) | (x >>> (32 - k))
}

/** MurmurHash3's fmix32: a bijection on 32-bit words with full avalanche. */
function mix32(z: number): number {
  let t = Math.imul(z ^ (z >>> 16), 0x85ebca6b)
  t = Math.imul(t ^ (t >>> 13), 0xc2b2ae35)
  return (t ^ (t >>> 16)) >>> 0
}

export class Random {
  private s0: number
  private s1: number
  private s2: number
  private s3: number
  private spareNormal = 0
  private hasSpareNormal = false

  /** A generator with the given 128-bit state (not all zero), as the reference code takes it. */
  static fromState(s0: number, s1: number, s2: number, s3: number): Random {
    const random = new Random(0)
    random.s0 = s0 | 0
    random.s1 = s1 | 0
    random.s2 = s2 | 0
    random.s3 = s3 | 0
    return random
  }

  /** Seeds are taken as unsigned 32-bit integers (seed mod 2³²). */
  constructor(seed: number) {
    let z = seed >>> 0
    const words = [0, 0, 0, 0].map(() => {
      z = (z + 0x9e3779b9) >>> 0
      return mix32(z) | 0
    })
    // Four distinct inputs to a bijection: at most one word is zero, so the state never is.
    this.s0 = words[0] ?? 1
    this.s1 = words[1] ?? 1
    this.s2 = words[2] ?? 1
    this.s3 = words[3] ?? 1
  }

  /** The next 32-bit output, unsigned. */
  nextUint32(): number {
    const s1 = this.s1
    const result = Math.imul(rotl(Math.imul(s1, 5), 7), 9) >>> 0
    const t = s1 << 9
    this.s2 ^= this.s0
    this.s3 ^= s1
    this.s1 = s1 ^ this.s2
    this.s0 ^= this.s3
    this.s2 ^= t
    this.s3 = rotl(this.s3, 11)
    return result
  }

  /** The state words, unsigned, for tests against the reference implementation. */
  state(): [number, number, number, number] {
    return [this.s0 >>> 0, this.s1 >>> 0, this.s2 >>> 0, this.s3 >>> 0]
  }

  /** Uniform on [0, 1) with 2⁻³² resolution. */
  uniform(): number {
    return this.nextUint32() / TWO_POW_32
  }

  /** Uniform integer in [0, n) for n ≤ 2³² (multiply-shift; bias below n/2³²). */
  integer(n: number): number {
    return Math.floor(this.uniform() * n)
  }

  /** Standard normal variate: Marsaglia's polar method, both values of each pair used. */
  normal(): number {
    if (this.hasSpareNormal) {
      this.hasSpareNormal = false
      return this.spareNormal
    }
    let u: number
    let v: number
    let s: number
    do {
      u = 2 * this.uniform() - 1
      v = 2 * this.uniform() - 1
      s = u * u + v * v
    } while (s >= 1 || s === 0)
    const factor = Math.sqrt((-2 * Math.log(s)) / s)
    this.spareNormal = v * factor
    this.hasSpareNormal = true
    return u * factor
  }

  /** Exponential variate with the given mean. */
  exponential(mean: number): number {
    return -mean * Math.log(1 - this.uniform())
  }

  /** Number of trials up to and including the first success (1, 2, …) with the given mean ≥ 1. */
  geometric(mean: number): number {
    if (!(mean > 1)) return 1
    return 1 + Math.floor(Math.log(1 - this.uniform()) / Math.log(1 - 1 / mean))
  }

  /** Log-normal variate: median · exp(shape · N(0, 1)). */
  logNormal(median: number, shape: number): number {
    return median * Math.exp(shape * this.normal())
  }

  /** Poisson variate with the given mean ≥ 0. */
  poisson(mean: number): number {
    if (!(mean > 0)) return 0
    if (mean < KNUTH_POISSON_LIMIT) return this.poissonKnuth(mean)
    return this.poissonPtrs(mean)
  }

  private poissonKnuth(mean: number): number {
    const limit = Math.exp(-mean)
    let count = 0
    let product = this.uniform()
    while (product > limit) {
      count++
      product *= this.uniform()
    }
    return count
  }

  /** Transformed rejection with squeeze (Hörmann 1993, Insurance Math Econ 12:39), mean ≥ 10. */
  private poissonPtrs(mean: number): number {
    const logMean = Math.log(mean)
    const b = 0.931 + 2.53 * Math.sqrt(mean)
    const a = -0.059 + 0.02483 * b
    const inverseAlpha = 1.1239 + 1.1328 / (b - 3.4)
    const vr = 0.9277 - 3.6224 / (b - 2)
    for (;;) {
      const u = this.uniform() - 0.5
      const v = this.uniform()
      const us = 0.5 - Math.abs(u)
      const k = Math.floor(((2 * a) / us + b) * u + mean + 0.43)
      if (us >= 0.07 && v <= vr) return k
      if (k < 0 || (us < 0.013 && v > us)) continue
      const lhs = Math.log(v) + Math.log(inverseAlpha) - Math.log(a / (us * us) + b)
      if (lhs <= -mean + k * logMean - logFactorial(k)) return k
    }
  }
}

const LOG_FACTORIAL_TABLE = (() => {
  const table = new Float64Array(256)
  for (let k = 2; k < table.length; k++) table[k] = (table[k - 1] ?? 0) + Math.log(k)
  return table
})()

/** ln k!: exact sums below 256, Stirling's series beyond (error below 1e-15 relative there). */
export function logFactorial(k: number): number {
  if (k < LOG_FACTORIAL_TABLE.length) return LOG_FACTORIAL_TABLE[k] ?? 0
  const inverse = 1 / k
  const inverse2 = inverse * inverse
  return (
    k * Math.log(k) -
    k +
    0.5 * Math.log(2 * Math.PI * k) +
    inverse * (1 / 12 - inverse2 * (1 / 360 - inverse2 / 1260))
  )
}

/** A seeded generator (see Random). */
export function createRandom(seed: number): Random {
  return new Random(seed)
}
