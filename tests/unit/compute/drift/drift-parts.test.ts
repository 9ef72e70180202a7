// @vitest-environment node
import { describe, expect, it } from 'vitest'
import { fft2d } from '@server/compute/fft'
import { createRandom } from '@server/compute/simulate'
import { subPixelPeak } from '@server/compute/drift/peak'
import { solveSegmentDrift } from '@server/compute/drift/solve-shifts'
import { WindowInverse } from '@server/compute/drift/window-inverse'

describe('WindowInverse', () => {
  it('matches the central square of the full inverse 2D FFT (the FFT area’s fft2d)', () => {
    const size = 64
    const random = createRandom(5)
    const re = Float64Array.from({ length: size * size }, () => random.uniform() - 0.5)
    const im = Float64Array.from({ length: size * size }, () => random.uniform() - 0.5)
    const window = new WindowInverse(size, 6)
    window.run(re, im)
    const fullRe = Float64Array.from(re)
    const fullIm = Float64Array.from(im)
    fft2d(fullRe, fullIm, size, true)
    for (let r = 0; r < window.width; r++) {
      for (let c = 0; c < window.width; c++) {
        const at = (size / 2 - 6 + r) * size + (size / 2 - 6 + c)
        expect(window.re[r * window.width + c]).toBeCloseTo(fullRe[at] ?? 0, 12)
        expect(window.im[r * window.width + c]).toBeCloseTo(fullIm[at] ?? 0, 12)
      }
    }
  })
})

describe('subPixelPeak', () => {
  // A sampled Gaussian: the parabola through the logarithms of three samples is exact (algebra).
  const gaussianWindow = (width: number, x0: number, y0: number, sigma: number) =>
    Float64Array.from({ length: width * width }, (_, k) => {
      const [x, y] = [(k % width) - (width - 1) / 2, Math.floor(k / width) - (width - 1) / 2]
      return Math.exp(-((x - x0) ** 2 + (y - y0) ** 2) / (2 * sigma * sigma))
    })

  it('finds the centre of a sampled Gaussian exactly', () => {
    const peak = subPixelPeak(gaussianWindow(21, 3.3, -2.45, 1.4), 21, 9)
    expect(peak.x).toBeCloseTo(3.3, 10)
    expect(peak.y).toBeCloseTo(-2.45, 10)
  })

  it('gives NaN when the highest value is on the edge of the reach', () => {
    const peak = subPixelPeak(gaussianWindow(21, 9.8, 0, 1.4), 21, 9)
    expect(peak.x).toBeNaN()
  })
})

describe('solveSegmentDrift', () => {
  // Exact pair shifts r_ij = d_j − d_i from a hand-made drift, one of them corrupted by 40 nm.
  const truth = [0, 3, 7, 12, 18]
  const pairs = {
    first: [] as number[],
    second: [] as number[],
    dx: [] as number[],
    dy: [] as number[],
  }
  for (let i = 0; i < truth.length; i++) {
    for (let j = i + 1; j < truth.length; j++) {
      pairs.first.push(i)
      pairs.second.push(j)
      pairs.dx.push((truth[j] ?? 0) - (truth[i] ?? 0))
      pairs.dy.push(-2 * ((truth[j] ?? 0) - (truth[i] ?? 0)))
    }
  }
  pairs.dx[4] = (pairs.dx[4] ?? 0) + 40
  const typed = {
    first: Uint16Array.from(pairs.first),
    second: Uint16Array.from(pairs.second),
    dx: Float64Array.from(pairs.dx),
    dy: Float64Array.from(pairs.dy),
  }

  it('drops the corrupted pair and recovers the drift exactly', () => {
    const solved = solveSegmentDrift(typed, truth.length, 10)
    expect(solved.pairsDropped).toBe(1)
    expect(solved.pairsUsed).toBe(9)
    truth.forEach((d, k) => {
      expect(solved.x[k]).toBeCloseTo(d, 9)
      expect(solved.y[k]).toBeCloseTo(-2 * d, 9)
    })
    expect(solved.rmsResidualNm).toBeCloseTo(0, 9)
  })

  it('skips unmeasured pairs and solves a chain of pairs exactly', () => {
    const chain = {
      first: Uint16Array.of(0, 1, 0),
      second: Uint16Array.of(1, 2, 2),
      dx: Float64Array.of(5, 50, Number.NaN),
      dy: Float64Array.of(0, 0, Number.NaN),
    }
    const solved = solveSegmentDrift(chain, 3, 1)
    expect(solved.connected).toBe(true)
    expect(solved.x[2]).toBeCloseTo(55, 9)
    expect(solved.pairsDropped).toBe(1)
  })

  it('takes dropped pairs back when every pair is over the limit, so all segments stay linked', () => {
    // An inconsistent triangle: each residual is 55/3 nm, far over the 1 nm limit.
    const triangle = {
      first: Uint16Array.of(0, 1, 0),
      second: Uint16Array.of(1, 2, 2),
      dx: Float64Array.of(5, 50, 0),
      dy: Float64Array.of(0, 0, 0),
    }
    const solved = solveSegmentDrift(triangle, 3, 1)
    expect(solved.connected).toBe(true)
    expect(solved.pairsUsed).toBe(2)
    expect(solved.pairsDropped).toBe(1)
  })
})
