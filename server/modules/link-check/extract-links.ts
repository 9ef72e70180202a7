import type { LinkKind } from '@shared/schemas/link-check.schema'

/** One thing a statement refers to, deduplicated by what it points at. */
export interface ExtractedLink {
  input: string
  kind: LinkKind
  /** The accession it names (accessions and this hub's dataset links). */
  accession: string | null
  /** A numeric dataset id, for this hub's links written with one. */
  datasetId: number | null
}

const ACCESSION = /\bSTPL-\d{6,}\b/gi
const URL = /\bhttps?:\/\/[^\s<>"'()[\]{}]+/gi
const DOI = /\b(?:doi:\s*)?(10\.\d{4,9}\/[^\s<>"'()[\]{}]+)/gi
/** Sentence punctuation after a link is not part of it. */
const trimEnd = (s: string) => s.replace(/[.,;:!?]+$/, '')

/**
 * Everything of interest in a pasted statement, in order of first appearance: this hub's
 * accessions and links (to a dataset page, a landing page or the API), DOIs, and other links.
 * Pure text work; no lookups.
 */
export function extractLinks(text: string, hubOrigin: string): ExtractedLink[] {
  const found = new Map<string, ExtractedLink & { at: number }>()
  const add = (key: string, at: number, link: ExtractedLink) => {
    if (!found.has(key)) found.set(key, { ...link, at })
  }
  const host = new globalThis.URL(hubOrigin).host.toLowerCase()
  const covered: [number, number][] = []

  for (const m of text.matchAll(URL)) {
    const raw = trimEnd(m[0])
    covered.push([m.index, m.index + raw.length])
    let parsed: globalThis.URL
    try {
      parsed = new globalThis.URL(raw)
    } catch {
      continue
    }
    if (parsed.host.toLowerCase() === host) {
      const ref = /^\/(?:api\/datasets|datasets|d)\/([^/?#]+)/.exec(parsed.pathname)?.[1]
      const accession = ref && /^STPL-\d{6,}$/i.test(ref) ? ref.toUpperCase() : null
      const datasetId = ref && /^\d+$/.test(ref) ? Number(ref) : null
      const key = accession ? `acc:${accession}` : datasetId ? `id:${datasetId}` : `url:${raw}`
      add(key, m.index, { input: raw, kind: 'hub_url', accession, datasetId })
    } else if (/^(dx\.)?doi\.org$/i.test(parsed.host)) {
      const doi = decodeURIComponent(parsed.pathname.slice(1))
      add(`doi:${doi.toLowerCase()}`, m.index, {
        input: raw,
        kind: 'doi',
        accession: null,
        datasetId: null,
      })
    } else {
      add(`url:${raw}`, m.index, {
        input: raw,
        kind: 'external_url',
        accession: null,
        datasetId: null,
      })
    }
  }
  const inUrl = (at: number) => covered.some(([from, to]) => at >= from && at < to)
  for (const m of text.matchAll(ACCESSION)) {
    if (inUrl(m.index)) continue
    const accession = m[0].toUpperCase()
    add(`acc:${accession}`, m.index, { input: m[0], kind: 'accession', accession, datasetId: null })
  }
  for (const m of text.matchAll(DOI)) {
    if (inUrl(m.index)) continue
    const doi = trimEnd(m[1]!)
    add(`doi:${doi.toLowerCase()}`, m.index, {
      input: doi,
      kind: 'doi',
      accession: null,
      datasetId: null,
    })
  }
  return [...found.values()].sort((a, b) => a.at - b.at).map(({ at: _at, ...link }) => link)
}
