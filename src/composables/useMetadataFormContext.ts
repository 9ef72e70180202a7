import { inject, provide, type InjectionKey } from 'vue'
import type { SectionCompleteness } from '@shared/metadata/completeness'
import type { Tier } from '@shared/metadata/field'
import type { MetadataSection } from '@shared/metadata/metadata.schema'
import type { SchemaNode } from '@/utils/metadataVocabulary'

/** What every field of the metadata form needs, handed down however deep the schema nests. */
export interface MetadataFormContext {
  value: (path: string) => unknown
  update: (path: string, value: unknown) => void
  /** A field lost focus: the place to save at once. */
  blur: (path: string) => void
  messages: (path: string, withItems?: boolean) => string[]
  suggestions: (path: string) => string[]
  /** Values derived from this field and its neighbours, shown beneath it. */
  notes: (path: string) => string[]
  /** The tier, which some answers raise (a human sample needs an ethics reference). */
  tier: (path: string, node: SchemaNode) => Tier
  /** How complete a section is, for its title. */
  section: (key: MetadataSection) => SectionCompleteness | undefined
  readonly: () => boolean
}

const KEY: InjectionKey<MetadataFormContext> = Symbol('metadata-form')

export const provideMetadataForm = (context: MetadataFormContext) => provide(KEY, context)

export function useMetadataForm(): MetadataFormContext {
  const context = inject(KEY, null)
  if (!context) throw new Error('Metadata fields must be placed inside a MetadataForm')
  return context
}
