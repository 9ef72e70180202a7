import { readFile } from 'node:fs/promises'
import { tableFromIPC } from 'apache-arrow'
import type { Localizations, NumericColumn } from '../localizations.types'
import { readStoreColumns } from './column-reader'

/** Roles of the store whose column feeds a field of `Localizations` (first present wins). */
const FIELDS: [keyof Omit<Localizations, 'count'>, string[]][] = [
  ['x', ['x']],
  ['y', ['y']],
  ['frame', ['frame']],
  ['z', ['z']],
  ['photons', ['photons']],
  ['background', ['background']],
  ['sigma', ['sigma', 'sigmaX']],
  ['uncertainty', ['uncertainty', 'uncertaintyX']],
  ['channel', ['channel']],
]

const isNumeric = (v: unknown): v is NumericColumn =>
  v instanceof Float64Array ||
  v instanceof Float32Array ||
  v instanceof Uint32Array ||
  v instanceof Uint16Array ||
  v instanceof Uint8Array

/**
 * A whole ingested table as the engines take it: one typed array per role, in the store's (tile)
 * order. The Arrow fields carry their role in their metadata; values are stored in nm and 0-based
 * frames already. A table without frames gets frame 0 everywhere.
 */
export async function readLocalizations(arrowPath: string): Promise<Localizations> {
  const wanted = new Set(FIELDS.flatMap(([, roles]) => roles))
  const direct = await readStoreColumns(arrowPath, (field) =>
    wanted.has(field.metadata.get('role') ?? ''),
  )
  const byRole = new Map<string, NumericColumn>()
  let count: number
  if (direct) {
    count = direct.count
    for (const [field, values] of direct.columns) {
      const role = field.metadata.get('role')!
      if (!byRole.has(role)) byRole.set(role, values)
    }
  } else {
    const table = tableFromIPC(await readFile(arrowPath))
    count = table.numRows
    for (const field of table.schema.fields) {
      const role = field.metadata.get('role')
      const values: unknown = table.getChild(field.name)?.toArray()
      if (role && !byRole.has(role) && isNumeric(values)) byRole.set(role, values)
    }
  }
  const locs: Partial<Localizations> = { count }
  for (const [key, roles] of FIELDS) {
    const column = roles.map((r) => byRole.get(r)).find(Boolean)
    if (column) (locs as Record<string, NumericColumn>)[key] = column
  }
  if (!locs.x || !locs.y) throw new Error('The localization store has no x or y column.')
  return { ...locs, frame: locs.frame ?? new Uint32Array(count) } as Localizations
}
