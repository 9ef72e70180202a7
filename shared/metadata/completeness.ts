import { isHumanDerived } from './biosample.schema'
import type { Tier } from './field'
import { METADATA_SECTIONS, type DatasetMetadata, type MetadataSection } from './metadata.schema'
import { metadataJsonSchema } from './vocabulary'

interface SchemaNode {
  type?: string
  title?: string
  properties?: Record<string, SchemaNode>
  items?: SchemaNode
  'x-tier'?: Tier
}

export interface MissingField {
  /** Dotted path into the metadata document, e.g. `instrument.objective.lensNA` or `labelling.0.target`. */
  path: string
  label: string
  tier: Tier
}

export interface SectionCompleteness {
  section: MetadataSection
  score: number
  missing: MissingField[]
}

export interface Completeness {
  /** 0–100, weighting required fields three times as much as recommended ones. */
  score: number
  required: { filled: number; total: number }
  recommended: { filled: number; total: number }
  readyToSubmit: boolean
  sections: SectionCompleteness[]
}

/** The description fields that live on the dataset record itself, counted in the Study section. */
export interface DatasetCore {
  title?: string | null
  description?: string | null
  licence?: string | null
}

const WEIGHT: Record<Tier, number> = { required: 3, recommended: 1, optional: 0 }
const filledValue = (v: unknown) =>
  v !== undefined &&
  v !== null &&
  !(typeof v === 'string' && v.trim() === '') &&
  !(Array.isArray(v) && v.length === 0)

interface Tally {
  filled: Record<Tier, number>
  total: Record<Tier, number>
  missing: MissingField[]
}

function count(t: Tally, path: string, label: string, tier: Tier, present: boolean) {
  t.total[tier]++
  if (present) t.filled[tier]++
  else if (tier !== 'optional') t.missing.push({ path, label, tier })
}

/** Walks a schema node and its value, counting leaves (and "has at least one" for lists). */
function walk(
  node: SchemaNode,
  value: unknown,
  path: string,
  label: string,
  tier: Tier,
  t: Tally,
  promote: (p: string) => Tier | null,
) {
  const effective = promote(path) ?? tier
  if (node.type === 'array' && node.items?.properties) {
    const list = Array.isArray(value) ? value : []
    count(t, path, `at least one entry in ${label}`, effective, list.length > 0)
    list.forEach((entry, i) => walkObject(node.items!, entry, `${path}.${i}`, t, promote))
    return
  }
  if (node.properties) return walkObject(node, value, path, t, promote)
  count(t, path, label, effective, filledValue(value))
}

function walkObject(
  node: SchemaNode,
  value: unknown,
  path: string,
  t: Tally,
  promote: (p: string) => Tier | null,
) {
  const obj = (value && typeof value === 'object' ? value : {}) as Record<string, unknown>
  for (const [key, child] of Object.entries(node.properties ?? {})) {
    walk(
      child,
      obj[key],
      path ? `${path}.${key}` : key,
      child.title ?? key,
      child['x-tier'] ?? 'optional',
      t,
      promote,
    )
  }
}

/**
 * Tiers some answers raise: a human-derived sample makes the ethics reference required, an EMCCD
 * makes the EM gain recommended. Keyed by field path; the form shows the same marks.
 */
export function promotedTiers(metadata: DatasetMetadata): Record<string, Tier> {
  const raised: Record<string, Tier> = {}
  if (isHumanDerived(metadata.biosample)) raised['biosample.ethicsReference'] = 'required'
  if (metadata.instrument?.detector?.type === 'EMCCD')
    raised['instrument.detector.emGain'] = 'recommended'
  return raised
}

let rootSchema: SchemaNode | null = null

/**
 * How complete a dataset's description is, computed from the schema's tiers alone: a score, and
 * per section the required and recommended fields still missing. A human-derived sample makes
 * the ethics reference required; an EMCCD makes the EM gain recommended.
 */
export function computeCompleteness(
  metadata: DatasetMetadata,
  core: DatasetCore = {},
): Completeness {
  rootSchema ??= metadataJsonSchema() as SchemaNode
  const raised = promotedTiers(metadata)
  const promote = (p: string): Tier | null => raised[p] ?? null

  const totals: Tally = {
    filled: { required: 0, recommended: 0, optional: 0 },
    total: { required: 0, recommended: 0, optional: 0 },
    missing: [],
  }
  const sections: SectionCompleteness[] = []
  for (const section of METADATA_SECTIONS) {
    const node = rootSchema.properties![section]!
    const t: Tally = {
      filled: { required: 0, recommended: 0, optional: 0 },
      total: { required: 0, recommended: 0, optional: 0 },
      missing: [],
    }
    if (section === 'study') {
      count(t, 'title', 'Title', 'required', filledValue(core.title))
      count(t, 'description', 'Description', 'required', filledValue(core.description))
      count(t, 'licence', 'Licence', 'required', filledValue(core.licence))
    }
    const value = (metadata as Record<string, unknown>)[section]
    if (node.type === 'array')
      walk(node, value, section, node.title ?? section, node['x-tier'] ?? 'optional', t, promote)
    else walkObject(node, value, section, t, promote)
    sections.push({ section, score: scoreOf(t), missing: t.missing })
    for (const tier of ['required', 'recommended', 'optional'] as const) {
      totals.filled[tier] += t.filled[tier]
      totals.total[tier] += t.total[tier]
    }
  }
  return {
    score: scoreOf(totals),
    required: { filled: totals.filled.required, total: totals.total.required },
    recommended: { filled: totals.filled.recommended, total: totals.total.recommended },
    readyToSubmit: totals.filled.required === totals.total.required,
    sections,
  }
}

function scoreOf(t: Tally): number {
  const total = t.total.required * WEIGHT.required + t.total.recommended * WEIGHT.recommended
  const filled = t.filled.required * WEIGHT.required + t.filled.recommended * WEIGHT.recommended
  return total === 0 ? 100 : Math.round((100 * filled) / total)
}
