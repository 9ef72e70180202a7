import { metadataSchema, type DatasetMetadata } from '@shared/metadata/metadata.schema'
import { updateDatasetSchema } from '@shared/schemas/dataset.schema'
import type { CoreField } from './metadataVocabulary'
import type { Draft } from './metadataPaths'

/** Messages keyed by dotted field path (`instrument.objective.lensNA`, `study.authors.0.orcid`). */
export type FieldMessages = Record<string, string>

interface Issue {
  readonly path: readonly PropertyKey[]
  readonly message: string
}

/** zod issues by field; the first message per field is kept, one clear sentence reads best. */
export function messagesByPath(issues: readonly Issue[], prefix = ''): FieldMessages {
  const out: FieldMessages = {}
  for (const issue of issues) {
    const path = [prefix, ...issue.path.map(String)].filter(Boolean).join('.')
    out[path] ??= issue.message
  }
  return out
}

export type DraftCheck =
  | { ok: true; metadata: DatasetMetadata; errors: FieldMessages }
  | { ok: false; errors: FieldMessages }

/** The whole document through the shared schema, cross-field checks included. */
export function checkDraft(draft: Draft): DraftCheck {
  const result = metadataSchema.safeParse(draft)
  return result.success
    ? { ok: true, metadata: result.data, errors: {} }
    : { ok: false, errors: messagesByPath(result.error.issues) }
}

export type CoreValues = Record<CoreField, string>

/** Title, description and licence as PATCH /api/datasets/:id would judge them. */
export function checkCore(core: CoreValues): FieldMessages {
  const { licence, ...rest } = core
  const result = updateDatasetSchema.safeParse(licence.trim() ? core : rest)
  return result.success ? {} : messagesByPath(result.error.issues)
}

/**
 * The messages to show under one field. A list of plain values (keywords) also shows what is
 * wrong with its items, whose paths end in an index.
 */
export function messagesAt(messages: FieldMessages, path: string, withItems = false): string[] {
  const own = messages[path]
  const items = withItems
    ? Object.entries(messages)
        .filter(([p]) => p.startsWith(`${path}.`))
        .map(([, m]) => m)
    : []
  return [...(own ? [own] : []), ...items]
}
