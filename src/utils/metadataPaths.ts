/** A metadata document as the form edits it: plain JSON, possibly incomplete or invalid. */
export type Draft = Record<string, unknown>

const isIndex = (key: string) => /^\d+$/.test(key)
const isRecord = (v: unknown): v is Record<string, unknown> =>
  typeof v === 'object' && v !== null && !Array.isArray(v)

/** Reads a dotted path (`instrument.lightSources.0.wavelengthNm`). */
export function getAt(doc: unknown, path: string): unknown {
  let node: unknown = doc
  for (const key of path.split('.')) {
    if (typeof node !== 'object' || node === null) return undefined
    node = Array.isArray(node) ? node[Number(key)] : (node as Record<string, unknown>)[key]
  }
  return node
}

type Container = Record<string, unknown> | unknown[]

function childOf(node: Container, key: string, nextKey: string): Container {
  const current = Array.isArray(node) ? node[Number(key)] : node[key]
  if (typeof current === 'object' && current !== null) return current as Container
  const created: Container = isIndex(nextKey) ? [] : {}
  if (Array.isArray(node)) node[Number(key)] = created
  else node[key] = created
  return created
}

/** Writes a dotted path, creating objects (and lists where the next key is an index). */
export function setAt(doc: Draft, path: string, value: unknown): void {
  const keys = path.split('.')
  let node: Container = doc
  keys.slice(0, -1).forEach((key, i) => (node = childOf(node, key, keys[i + 1] ?? '')))
  const last = keys.at(-1) ?? ''
  if (Array.isArray(node)) node[Number(last)] = value
  else if (value === undefined) delete node[last]
  else node[last] = value
}

/** The key under which the server lists suggestions: list indices become `*`. */
export const suggestionKey = (path: string) =>
  path
    .split('.')
    .map((k) => (isIndex(k) ? '*' : k))
    .join('.')

/** The id of a field's input, so a list of gaps can move the focus there. */
export const fieldId = (path: string) => `md-${path.split('.').join('-')}`

/** Whether a value counts as given: the rule completeness uses (no blanks, no empty lists). */
export function isFilled(value: unknown): boolean {
  if (value === undefined || value === null) return false
  if (typeof value === 'string') return value.trim() !== ''
  if (Array.isArray(value)) return value.length > 0
  if (isRecord(value)) return Object.values(value).some(isFilled)
  return true
}

/**
 * The document as it can be stored: blanks and emptied groups dropped. List entries keep their
 * places (as `{}` when empty) so messages about `labelling.1` still point at the second entry.
 */
export function cleanDraft(value: unknown): unknown {
  if (Array.isArray(value)) return value.map((v) => (isRecord(v) ? (cleanDraft(v) ?? {}) : v))
  if (isRecord(value)) {
    const out: Draft = {}
    for (const [key, child] of Object.entries(value)) {
      const cleaned =
        typeof child === 'string' && child.trim() === '' ? undefined : cleanDraft(child)
      if (cleaned !== undefined && cleaned !== null) out[key] = cleaned
    }
    return Object.keys(out).length ? out : undefined
  }
  return value
}

/** Every given leaf as [path, value]; lists of plain values (keywords) are one leaf. */
export function filledLeaves(doc: unknown, prefix = ''): [string, unknown][] {
  if (Array.isArray(doc) && doc.some((v) => typeof v === 'object' && v !== null)) {
    return doc.flatMap((v, i) => filledLeaves(v, prefix ? `${prefix}.${i}` : String(i)))
  }
  if (isRecord(doc)) {
    return Object.entries(doc).flatMap(([k, v]) => filledLeaves(v, prefix ? `${prefix}.${k}` : k))
  }
  return isFilled(doc) ? [[prefix, doc]] : []
}

/** `cleanDraft` of a whole document, which is always an object (possibly empty). */
export function cleanDocument(draft: Draft): Draft {
  const cleaned = cleanDraft(draft)
  return isRecord(cleaned) ? cleaned : {}
}
