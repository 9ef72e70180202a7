/** Fixed FRC threshold 1/7 ≈ 0.1429 (Nieuwenhuizen et al. 2013). */
export const FRC_THRESHOLD = 1 / 7

/**
 * Frequency (cycles/nm) where the smoothed curve first falls through the threshold, going down,
 * interpolated linearly between the two rings around it; null when it never does below Nyquist.
 */
export function thresholdCrossing(
  smoothed: ArrayLike<number>,
  frequencyPerNm: ArrayLike<number>,
  threshold = FRC_THRESHOLD,
): number | null {
  for (let k = 1; k < smoothed.length; k++) {
    const before = smoothed[k - 1]!
    const after = smoothed[k]!
    if (before >= threshold && after < threshold) {
      const fraction = (before - threshold) / (before - after)
      const q0 = frequencyPerNm[k - 1]!
      return q0 + fraction * (frequencyPerNm[k]! - q0)
    }
  }
  return null
}
