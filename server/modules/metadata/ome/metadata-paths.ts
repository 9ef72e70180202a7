import type { DatasetMetadata } from '@shared/metadata/metadata.schema'

/** Reads a dotted path (`instrument.lightSources.0.wavelengthNm`) from a metadata document. */
export function getPath(doc: unknown, path: string): unknown {
  let node: unknown = doc
  for (const key of path.split('.')) {
    if (node === null || typeof node !== 'object') return undefined
    node = (node as Record<string, unknown>)[key]
  }
  return node
}

/** Writes a dotted path, creating objects, and arrays where the next key is an index. */
export function setPath(doc: DatasetMetadata, path: string, value: unknown): void {
  const keys = path.split('.')
  let node = doc as Record<string, unknown>
  keys.forEach((key, i) => {
    if (i === keys.length - 1) {
      node[key] = value
      return
    }
    if (node[key] === undefined || node[key] === null || typeof node[key] !== 'object') {
      node[key] = /^\d+$/.test(keys[i + 1]!) ? [] : {}
    }
    node = node[key] as Record<string, unknown>
  })
}

/** Every leaf of a document as [path, value]; arrays of scalars (keywords) count as one leaf. */
export function leaves(doc: unknown, prefix = ''): [string, unknown][] {
  if (doc === null || doc === undefined) return []
  if (Array.isArray(doc)) {
    if (doc.every((v) => v === null || typeof v !== 'object')) return prefix ? [[prefix, doc]] : []
    return doc.flatMap((v, i) => leaves(v, prefix ? `${prefix}.${i}` : String(i)))
  }
  if (typeof doc === 'object') {
    return Object.entries(doc as Record<string, unknown>).flatMap(([k, v]) =>
      leaves(v, prefix ? `${prefix}.${k}` : k),
    )
  }
  return prefix ? [[prefix, doc]] : []
}
