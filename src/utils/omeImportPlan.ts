import type { OmeImportReport } from '@/api/metadata'
import { getAt, isFilled, type Draft } from './metadataPaths'
import { describePath, nodeAt, type SchemaNode } from './metadataVocabulary'

export interface ImportItem {
  path: string
  /** Where in the OME-XML document the value came from. */
  from: string
  value: unknown
  label: string
}
export interface ImportConflict extends ImportItem {
  current: unknown
}
export interface ImportPlan {
  /** Empty fields the import would fill. */
  fills: ImportItem[]
  /** Fields already holding another value: the depositor chooses. */
  conflicts: ImportConflict[]
  /** Fields that already hold the same value. */
  unchanged: ImportItem[]
}

const same = (a: unknown, b: unknown) => JSON.stringify(a) === JSON.stringify(b)

/** Sorts what an import maps into fills, conflicts with what is typed, and no-ops. */
export function planImport(
  current: Draft,
  mapped: OmeImportReport['mapped'],
  schema: SchemaNode,
): ImportPlan {
  const plan: ImportPlan = { fills: [], conflicts: [], unchanged: [] }
  for (const m of mapped) {
    const item = { ...m, label: describePath(schema, m.path) }
    const now = getAt(current, m.path)
    if (!isFilled(now)) plan.fills.push(item)
    else if (same(now, m.value)) plan.unchanged.push(item)
    else plan.conflicts.push({ ...item, current: now })
  }
  return plan
}

/** The values to write: every fill, and the conflicts the depositor chose to take. */
export function chosenValues(plan: ImportPlan, take: ReadonlySet<string>) {
  return [...plan.fills, ...plan.conflicts.filter((c) => take.has(c.path))].map(
    ({ path, value }) => ({ path, value }),
  )
}

/** A value as the review lists it, with the field's unit. */
export function showValue(schema: SchemaNode, path: string, value: unknown): string {
  const unit = nodeAt(schema, path)?.['x-unit']
  const text = Array.isArray(value)
    ? value.join(', ')
    : typeof value === 'object' && value !== null
      ? JSON.stringify(value)
      : String(value)
  return unit && typeof value === 'number' ? `${text} ${unit}` : text
}
