/**
 * A small least-recently-used cache whose entries are valid for one access version only. Reading
 * with a newer version misses, so nothing stale is ever served, in this process or after a change
 * made by another one.
 */
export class VersionedCache<T> {
  private readonly entries = new Map<string, { version: number; value: T }>()

  constructor(private readonly capacity: number) {}

  get(key: string, version: number): T | undefined {
    const hit = this.entries.get(key)
    if (!hit) return undefined
    this.entries.delete(key)
    if (hit.version !== version) return undefined
    this.entries.set(key, hit)
    return hit.value
  }

  set(key: string, version: number, value: T): void {
    this.entries.delete(key)
    this.entries.set(key, { version, value })
    if (this.entries.size > this.capacity) this.entries.delete(this.entries.keys().next().value!)
  }

  get size(): number {
    return this.entries.size
  }
}
