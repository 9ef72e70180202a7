import { Cite } from '@citation-js/core'
import '@citation-js/plugin-bibtex'
import '@citation-js/plugin-csl'
import '@citation-js/plugin-ris'

/** What a citation of one dataset version needs. */
export interface CitationSubject {
  accession: string
  title: string
  /** Personal names as written in the metadata ("Avery Tester"). */
  authors: string[]
  /** The organisation credited when no author is named (the project). */
  fallbackAuthor: string
  version: number
  /** The day the version became (or becomes) public. */
  published: Date | null
  url: string
  doi?: string | null
}

export interface Citations {
  /** One reference in the APA style, plain text. */
  text: string
  bibtex: string
  ris: string
}

/**
 * A personal name as CSL-JSON: the last word is the family name. Names in the metadata are one
 * free-text field, so particles ("van der") stay with the given name: a safe reading that
 * never drops a word.
 */
function cslName(name: string) {
  const words = name.trim().split(/\s+/)
  if (words.length < 2) return { literal: name.trim() }
  return { family: words[words.length - 1]!, given: words.slice(0, -1).join(' ') }
}

/** The version as CSL-JSON, the one form citation-js turns into every other. */
export function cslItem(s: CitationSubject) {
  const named = s.authors.map((a) => a.trim()).filter(Boolean)
  const published = s.published
  return {
    id: `${s.accession}-v${s.version}`,
    type: 'dataset',
    title: s.title,
    author: named.length ? named.map(cslName) : [{ literal: s.fallbackAuthor }],
    ...(published
      ? {
          issued: {
            'date-parts': [
              [published.getUTCFullYear(), published.getUTCMonth() + 1, published.getUTCDate()],
            ],
          },
        }
      : {}),
    publisher: 'Stipple',
    version: String(s.version),
    number: s.accession,
    URL: s.url,
    ...(s.doi ? { DOI: s.doi } : {}),
  }
}

/** Plain text (CSL APA style), BibTeX and RIS of one dataset version, all by citation-js. */
export function citationsOf(s: CitationSubject): Citations {
  const cite = new Cite(cslItem(s))
  return {
    text: cite.format('bibliography', { format: 'text', template: 'apa', lang: 'en-US' }).trim(),
    bibtex: cite.format('bibtex').trim(),
    ris: cite.format('ris').trim(),
  }
}
