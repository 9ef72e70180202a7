import type { Tier } from '@shared/metadata/field'
import { METADATA_SECTIONS, type MetadataSection } from '@shared/metadata/metadata.schema'
import { metadataJsonSchema } from '@shared/metadata/vocabulary'

/** The part of JSON Schema (plus our `x-` keywords) that the metadata form reads. */
export interface SchemaNode {
  type?: string
  title?: string
  description?: string
  enum?: readonly string[]
  properties?: Record<string, SchemaNode>
  items?: SchemaNode
  maxItems?: number
  maxLength?: number
  'x-tier'?: Tier
  'x-unit'?: string
  'x-term'?: string
  'x-suggest'?: boolean
  'x-multiline'?: boolean
}

export type FieldKind = 'group' | 'list' | 'chips' | 'select' | 'number' | 'textarea' | 'text'

/** How a schema node is edited: its input follows from the JSON Schema keywords alone. */
export function fieldKind(node: SchemaNode): FieldKind {
  if (node.properties) return 'group'
  if (node.type === 'array') return node.items?.properties ? 'list' : 'chips'
  if (node.enum) return 'select'
  if (node.type === 'number' || node.type === 'integer') return 'number'
  return node['x-multiline'] ? 'textarea' : 'text'
}

let vocabulary: SchemaNode | null = null

/**
 * The vocabulary built from the same zod schema the form validates with, so the two cannot
 * disagree; GET /api/vocabulary serves this very document for other clients.
 */
export function metadataVocabulary(): SchemaNode {
  // z.toJSONSchema's result is typed loosely; the keywords read here are the ones it writes.
  vocabulary ??= metadataJsonSchema() as SchemaNode
  return vocabulary
}

export interface SchemaSection {
  key: MetadataSection
  node: SchemaNode
}

export function sectionsOf(root: SchemaNode): SchemaSection[] {
  return METADATA_SECTIONS.flatMap((key) => {
    const node = root.properties?.[key]
    return node ? [{ key, node }] : []
  })
}

/** The dataset record's own fields, shown and counted in the Study section. */
export const CORE_FIELDS = { title: 'Title', description: 'Description', licence: 'Licence' }
export type CoreField = keyof typeof CORE_FIELDS
export const isCoreField = (path: string): path is CoreField => path in CORE_FIELDS

/** The section a field belongs to; the dataset record's own fields are shown in Study. */
export function sectionOfPath(path: string): MetadataSection | null {
  if (isCoreField(path)) return 'study'
  const first = path.split('.')[0]
  return METADATA_SECTIONS.find((s) => s === first) ?? null
}

/** The node a dotted path leads to; list indices step into `items`. */
export function nodeAt(root: SchemaNode, path: string): SchemaNode | undefined {
  let node: SchemaNode | undefined = root
  for (const key of path.split('.')) {
    if (!node) return undefined
    node = /^\d+$/.test(key) ? node.items : node.properties?.[key]
  }
  return node
}

/** A field's place in words: `Instrument › Objective › Numerical aperture (NA)`, `Study › Author 1 › Name`. */
export function describePath(root: SchemaNode, path: string): string {
  if (isCoreField(path)) return `${root.properties?.study?.title ?? 'Study'} › ${CORE_FIELDS[path]}`
  const words: string[] = []
  let node: SchemaNode | undefined = root
  for (const key of path.split('.')) {
    if (/^\d+$/.test(key)) {
      const noun = node ? entryNoun(node) : 'entry'
      words[Math.max(0, words.length - 1)] =
        `${noun[0]?.toUpperCase()}${noun.slice(1)} ${Number(key) + 1}`
      node = node?.items
    } else {
      node = node?.properties?.[key]
      const word = node?.title ?? key
      // A group and its main field often share a name (Organism › Organism): say it once.
      if (word !== words.at(-1)) words.push(word)
    }
  }
  return words.join(' › ')
}

/** The field's place below its section (the heading it is listed under), or `fallback`. */
export function describeWithinSection(root: SchemaNode, path: string, fallback: string): string {
  return describePath(root, path).split(' › ').slice(1).join(' › ') || fallback
}

/** What one entry of a list is called: "author" for Authors, "light source" for Light sources. */
export function entryNoun(node: SchemaNode): string {
  const title = (node.title ?? 'entry').toLowerCase()
  return /[^s]s$/.test(title) ? title.slice(0, -1) : title
}
