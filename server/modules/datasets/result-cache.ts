/**
 * Whole list results (dataset ids in order) kept for one access version each, least recently used
 * first out, bounded by the number of ids held rather than by entries: one result may hold a
 * hundred thousand ids, another three.
 */
export class ResultCache {
  private readonly entries = new Map<string, { version: number; ids: Int32Array }>()
  private held = 0

  constructor(private readonly maxIds: number) {}

  get(key: string, version: number): Int32Array | undefined {
    const hit = this.entries.get(key)
    if (!hit) return undefined
    this.entries.delete(key)
    if (hit.version !== version) {
      this.held -= hit.ids.length
      return undefined
    }
    this.entries.set(key, hit)
    return hit.ids
  }

  set(key: string, version: number, ids: Int32Array): void {
    const old = this.entries.get(key)
    if (old) {
      this.entries.delete(key)
      this.held -= old.ids.length
    }
    this.entries.set(key, { version, ids })
    this.held += ids.length
    for (const [oldest, entry] of this.entries) {
      if (this.held <= this.maxIds || oldest === key) break
      this.entries.delete(oldest)
      this.held -= entry.ids.length
    }
  }

  /** Ids held now (for tests). */
  get size(): number {
    return this.held
  }
}
