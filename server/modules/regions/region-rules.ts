import type { Viewer } from '@shared/permissions/viewer'
import { boxesMeet, regionBounds, regionGeometryProblem } from '@shared/domain/region-geometry'
import type { RegionGeometry } from '@shared/schemas/region.schema'
import type { PreviewInfo } from '@shared/schemas/preview.schema'
import { ValidationError } from '../../errors/http-error'

/**
 * Whether someone may change (edit, delete) what another person wrote on a dataset: its author,
 * an owner of the dataset's project, or a site admin.
 */
export function maySupervise(
  viewer: Viewer | null | undefined,
  project: number,
  authorId: number,
): boolean {
  if (!viewer) return false
  return (
    viewer.id === authorId ||
    viewer.siteRole === 'admin' ||
    viewer.memberships.some((m) => m.projectId === project && m.role === 'owner')
  )
}

/** Refuses (400) a geometry that crosses itself, encloses nothing, or lies wholly off the table. */
export function checkGeometry(geometry: RegionGeometry, bounds: PreviewInfo['boundsNm']) {
  const problem = regionGeometryProblem(geometry)
  if (problem) throw new ValidationError([{ pointer: '#/geometry', detail: problem }], problem)
  if (!boxesMeet(regionBounds(geometry), bounds)) {
    const detail = `The region lies wholly outside the table's localizations (x ${Math.round(bounds.xMin)}–${Math.round(bounds.xMax)} nm, y ${Math.round(bounds.yMin)}–${Math.round(bounds.yMax)} nm).`
    throw new ValidationError([{ pointer: '#/geometry', detail }], detail)
  }
}
