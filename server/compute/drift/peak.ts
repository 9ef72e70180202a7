/**
 * Highest value of a centred, odd-sided correlation window within `reach` pixels of its centre, refined to
 * sub-pixel precision by a Gaussian through the peak and its two neighbours on each axis (the
 * parabola through the logarithms; exact for a sampled Gaussian peak), or by a plain parabola when a
 * neighbour is not positive. Returns the shift from the centre in pixels, NaN when the highest value
 * lies on the edge of the searched square (the true peak may be further out).
 */
export function subPixelPeak(image: Float64Array, size: number, reach: number) {
  const centre = (size - 1) / 2
  let best = -Infinity
  let bestRow = centre
  let bestColumn = centre
  for (let row = centre - reach; row <= centre + reach; row++) {
    for (let column = centre - reach; column <= centre + reach; column++) {
      const value = image[row * size + column] ?? -Infinity
      if (value > best) {
        best = value
        bestRow = row
        bestColumn = column
      }
    }
  }
  const onEdge = Math.abs(bestRow - centre) === reach || Math.abs(bestColumn - centre) === reach
  if (onEdge || !(best > 0)) return { x: Number.NaN, y: Number.NaN }
  const at = bestRow * size + bestColumn
  const x = vertexOffset(image[at - 1] ?? 0, best, image[at + 1] ?? 0)
  const y = vertexOffset(image[at - size] ?? 0, best, image[at + size] ?? 0)
  return { x: bestColumn - centre + x, y: bestRow - centre + y }
}

/** Offset (−0.5 … 0.5) of the vertex through three equally spaced samples around a maximum. */
function vertexOffset(before: number, peak: number, after: number): number {
  if (before > 0 && after > 0) {
    const [l, c, r] = [Math.log(before), Math.log(peak), Math.log(after)]
    const curvature = l - 2 * c + r
    if (curvature < 0) return clampHalf((l - r) / (2 * curvature))
  }
  const curvature = before - 2 * peak + after
  return curvature < 0 ? clampHalf((before - after) / (2 * curvature)) : 0
}

function clampHalf(offset: number): number {
  return Math.max(-0.5, Math.min(0.5, offset))
}
