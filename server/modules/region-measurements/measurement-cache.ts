/**
 * Measurement results kept per region geometry, parameters and store version, so asking again is
 * free. Bounded (least recently used goes first); a changed geometry or a re-read table is a new key.
 */
import type { MeasurementQuery } from '@shared/schemas/region-measurement.schema'
import type { RegionGeometry } from '@shared/schemas/region.schema'
import type { Measured } from '../../compute/regions'

const KEPT = 256

export class MeasurementCache {
  private readonly entries = new Map<string, Measured>()

  static key(
    regionId: number,
    geometry: RegionGeometry,
    query: MeasurementQuery,
    storeMtimeMs: number,
  ) {
    return JSON.stringify([regionId, geometry, query, storeMtimeMs])
  }

  get(key: string): Measured | undefined {
    const hit = this.entries.get(key)
    if (hit) {
      this.entries.delete(key)
      this.entries.set(key, hit)
    }
    return hit
  }

  set(key: string, value: Measured) {
    this.entries.set(key, value)
    if (this.entries.size > KEPT) this.entries.delete(this.entries.keys().next().value!)
  }
}
