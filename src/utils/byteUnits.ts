const IEC = ['bytes', 'KiB', 'MiB', 'GiB', 'TiB', 'PiB'] as const

/** A size in IEC binary units (1 KiB = 1024 bytes, IEC 80000-13), three significant digits. */
export function formatBytes(bytes: number): string {
  if (!Number.isFinite(bytes) || bytes < 1024) return `${Math.max(0, Math.round(bytes))} bytes`
  let value = bytes
  let unit = 0
  while (value >= 1024 && unit < IEC.length - 1) {
    value /= 1024
    unit++
  }
  const digits = value >= 100 ? 0 : value >= 10 ? 1 : 2
  return `${value.toFixed(digits)} ${IEC[unit]}`
}

/** A transfer speed in decimal megabytes per second (1 MB = 10⁶ bytes, SI), as links are rated. */
export function formatRate(bytesPerSecond: number): string {
  const mb = bytesPerSecond / 1e6
  return `${mb >= 100 ? mb.toFixed(0) : mb >= 1 ? mb.toFixed(1) : mb.toFixed(2)} MB/s`
}

/** A duration in words a person reads at a glance: `45 s`, `3 min 20 s`, `2 h 5 min`. */
export function formatDuration(seconds: number): string {
  const s = Math.max(0, Math.round(seconds))
  if (s < 1) return 'less than a second'
  if (s < 60) return `${s} s`
  const minutes = Math.floor(s / 60)
  if (minutes < 60) return s % 60 ? `${minutes} min ${s % 60} s` : `${minutes} min`
  const hours = Math.floor(minutes / 60)
  return minutes % 60 ? `${hours} h ${minutes % 60} min` : `${hours} h`
}

/** Whole percent, never 100 before the last byte. */
export function percentOf(part: number, whole: number): number {
  if (whole <= 0) return 0
  const p = Math.floor((part / whole) * 100)
  return part >= whole ? 100 : Math.min(p, 99)
}
