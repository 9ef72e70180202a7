/**
 * Least-squares fit of a constant plus one or two Gaussians to a histogram, by Levenberg–Marquardt
 * (Levenberg 1944, Marquardt 1963) with the analytic Jacobian. Parameters: [background, then per
 * peak amplitude, centre, σ]. Few parameters (≤ 7), so the normal equations are solved directly.
 */

export interface GaussianPeak {
  amplitude: number
  centre: number
  sigma: number
}

export interface GaussianFit {
  background: number
  peaks: GaussianPeak[]
  /** Sum of squared residuals. */
  rss: number
}

function model(p: number[], s: number): number {
  let v = p[0]!
  for (let k = 1; k < p.length; k += 3) {
    const z = (s - p[k + 1]!) / p[k + 2]!
    v += p[k]! * Math.exp(-0.5 * z * z)
  }
  return v
}

function residualSum(p: number[], xs: number[], ys: number[]): number {
  let rss = 0
  for (let i = 0; i < xs.length; i++) rss += (ys[i]! - model(p, xs[i]!)) ** 2
  return rss
}

/** Solves A·x = b (A symmetric positive definite after damping) by Gaussian elimination. */
function solve(a: number[][], b: number[]): number[] | null {
  const n = b.length
  const m = a.map((row, i) => [...row, b[i]!])
  for (let c = 0; c < n; c++) {
    let pivot = c
    for (let r = c + 1; r < n; r++) if (Math.abs(m[r]![c]!) > Math.abs(m[pivot]![c]!)) pivot = r
    if (Math.abs(m[pivot]![c]!) < 1e-300) return null
    ;[m[c], m[pivot]] = [m[pivot]!, m[c]!]
    for (let r = c + 1; r < n; r++) {
      const f = m[r]![c]! / m[c]![c]!
      for (let k = c; k <= n; k++) m[r]![k]! -= f * m[c]![k]!
    }
  }
  const x = new Array<number>(n).fill(0)
  for (let r = n - 1; r >= 0; r--) {
    let v = m[r]![n]!
    for (let k = r + 1; k < n; k++) v -= m[r]![k]! * x[k]!
    x[r] = v / m[r]![r]!
  }
  return x
}

export function fitGaussians(xs: number[], ys: number[], start: number[]): GaussianFit {
  let p = [...start]
  let rss = residualSum(p, xs, ys)
  let lambda = 1e-3
  const np = p.length
  for (let iteration = 0; iteration < 200; iteration++) {
    const jtj = Array.from({ length: np }, () => new Array<number>(np).fill(0))
    const jtr = new Array<number>(np).fill(0)
    const grad = new Array<number>(np)
    for (let i = 0; i < xs.length; i++) {
      const s = xs[i]!
      grad[0] = 1
      for (let k = 1; k < np; k += 3) {
        const a = p[k]!
        const mu = p[k + 1]!
        const sg = p[k + 2]!
        const z = (s - mu) / sg
        const e = Math.exp(-0.5 * z * z)
        grad[k] = e
        grad[k + 1] = (a * e * z) / sg
        grad[k + 2] = (a * e * z * z) / sg
      }
      const r = ys[i]! - model(p, s)
      for (let u = 0; u < np; u++) {
        jtr[u]! += grad[u]! * r
        for (let v = 0; v < np; v++) jtj[u]![v]! += grad[u]! * grad[v]!
      }
    }
    let improved = false
    for (let tries = 0; tries < 10 && !improved; tries++) {
      const damped = jtj.map((row, u) => row.map((v, w) => (u === w ? v * (1 + lambda) : v)))
      const step = solve(damped, jtr)
      if (!step) break
      const trial = p.map((v, u) => v + step[u]!)
      for (let k = 3; k < np; k += 3) trial[k] = Math.abs(trial[k]!) || 1e-9 // σ stays positive
      const trialRss = residualSum(trial, xs, ys)
      if (trialRss < rss) {
        const gain = rss - trialRss
        p = trial
        rss = trialRss
        lambda = Math.max(1e-9, lambda / 10)
        improved = true
        if (gain < 1e-10 * (rss + 1e-300)) iteration = Infinity
      } else lambda *= 10
    }
    if (!improved) break
  }
  const peaks: GaussianPeak[] = []
  for (let k = 1; k < np; k += 3)
    peaks.push({ amplitude: p[k]!, centre: p[k + 1]!, sigma: p[k + 2]! })
  peaks.sort((a, b) => a.centre - b.centre)
  return { background: p[0]!, peaks, rss }
}
