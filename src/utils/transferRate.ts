/** One progress report: how many bytes the server had at a moment (ms). */
interface Sample {
  at: number
  bytes: number
}

/** Below this span the rate of a few chunks says more about buffering than about the link. */
const MIN_SPAN_MS = 400

/**
 * Upload speed over a sliding window of progress reports, and the time left at that speed. A
 * window rather than the whole history, so a link that slows down shows it within seconds.
 */
export class TransferRate {
  private samples: Sample[] = []

  constructor(private readonly windowMs = 5_000) {}

  /** Forget the history: after a pause the old speed says nothing about the next one. */
  reset(): void {
    this.samples = []
  }

  add(bytes: number, at: number): void {
    this.samples.push({ bytes, at })
    // Keep one sample at or before the window's start, so the window is always fully spanned.
    while (this.samples.length > 2 && (this.samples[1]?.at ?? at) <= at - this.windowMs) {
      this.samples.shift()
    }
  }

  /** Bytes per second, or null until the reports span long enough to say. */
  bytesPerSecond(): number | null {
    const first = this.samples[0]
    const last = this.samples.at(-1)
    if (!first || !last || last.at - first.at < MIN_SPAN_MS) return null
    return ((last.bytes - first.bytes) * 1000) / (last.at - first.at)
  }

  /** Seconds until `total` bytes at the current speed; null when the speed is not known. */
  secondsLeft(total: number): number | null {
    const rate = this.bytesPerSecond()
    const last = this.samples.at(-1)
    if (rate === null || !last || rate <= 0) return null
    return Math.max(0, total - last.bytes) / rate
  }
}
