/**
 * Direct O(n⁴) 2D DFT straight from its definition, F(u,v) = Σ f(x,y)·exp(∓2πi(ux + vy)/n),
 * written independently of the FFT under test (textbook definition).
 */
export function naiveDft2d(
  re: ArrayLike<number>,
  im: ArrayLike<number>,
  size: number,
  inverse = false,
): { re: Float64Array; im: Float64Array } {
  const outRe = new Float64Array(size * size)
  const outIm = new Float64Array(size * size)
  const sign = inverse ? 1 : -1
  for (let v = 0; v < size; v++) {
    for (let u = 0; u < size; u++) {
      let sumRe = 0
      let sumIm = 0
      for (let y = 0; y < size; y++) {
        for (let x = 0; x < size; x++) {
          const angle = (sign * 2 * Math.PI * (u * x + v * y)) / size
          const fr = re[y * size + x] ?? 0
          const fi = im[y * size + x] ?? 0
          sumRe += fr * Math.cos(angle) - fi * Math.sin(angle)
          sumIm += fr * Math.sin(angle) + fi * Math.cos(angle)
        }
      }
      const scale = inverse ? 1 / (size * size) : 1
      outRe[v * size + u] = sumRe * scale
      outIm[v * size + u] = sumIm * scale
    }
  }
  return { re: outRe, im: outIm }
}

export function randomImage(size: number, random: () => number): Float64Array {
  const image = new Float64Array(size * size)
  for (let i = 0; i < image.length; i++) image[i] = random() * 2 - 1
  return image
}

export function maxAbsDifference(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let worst = 0
  for (let i = 0; i < a.length; i++) worst = Math.max(worst, Math.abs((a[i] ?? 0) - (b[i] ?? 0)))
  return worst
}
