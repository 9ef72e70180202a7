import type { MeasurementKind, MeasurementResult } from '@shared/schemas/region-measurement.schema'
import { api } from './client'

export type { MeasurementKind, MeasurementResult } from '@shared/schemas/region-measurement.schema'

/** One measurement of a region; the server fills in a default for every parameter left out. */
export const getRegionMeasurement = (
  regionId: number,
  query: { kind: MeasurementKind } & Record<string, string | number>,
) => api.get<MeasurementResult>(`/api/regions/${regionId}/measurements`, query)

/** A table's regions as a file (a download, so a plain link). */
export const regionsExportUrl = (
  datasetId: number | string,
  fileId: number,
  format: 'geojson' | 'ome-xml',
) =>
  `/api/datasets/${encodeURIComponent(String(datasetId))}/files/${fileId}/regions/export?format=${format}`
