/**
 * What the common data licences allow, in plain words, for the public landing page. Summaries of
 * each licence's own deed (creativecommons.org, opendatacommons.org; from memory), not legal
 * advice: the page always links the full text at SPDX.
 */
export interface LicenceTerms {
  name: string
  /** What anyone may do with the data. */
  allows: string[]
  /** What they must do in return. */
  requires: string[]
}

const SHARE_ADAPT = ['copy and redistribute the data', 'adapt and build upon it']

export const LICENCE_TERMS: Record<string, LicenceTerms> = {
  'CC0-1.0': {
    name: 'CC0 1.0 Universal (public domain dedication)',
    allows: [...SHARE_ADAPT, 'use it for any purpose, including commercially'],
    requires: ['nothing; citing the dataset is still good scientific practice'],
  },
  'CC-BY-4.0': {
    name: 'Creative Commons Attribution 4.0',
    allows: [...SHARE_ADAPT, 'use it for any purpose, including commercially'],
    requires: ['credit the authors and link the licence', 'indicate changes you made'],
  },
  'CC-BY-SA-4.0': {
    name: 'Creative Commons Attribution-ShareAlike 4.0',
    allows: [...SHARE_ADAPT, 'use it for any purpose, including commercially'],
    requires: [
      'credit the authors and link the licence',
      'indicate changes you made',
      'share adaptations under the same licence',
    ],
  },
  'CC-BY-NC-4.0': {
    name: 'Creative Commons Attribution-NonCommercial 4.0',
    allows: [...SHARE_ADAPT, 'use it for non-commercial purposes'],
    requires: ['credit the authors and link the licence', 'indicate changes you made'],
  },
  'ODbL-1.0': {
    name: 'Open Data Commons Open Database License 1.0',
    allows: [...SHARE_ADAPT, 'use it for any purpose, including commercially'],
    requires: [
      'attribute the source',
      'share adapted databases under the same licence',
      'keep the database open (no technical restrictions without an open copy)',
    ],
  },
  'ODC-By-1.0': {
    name: 'Open Data Commons Attribution License 1.0',
    allows: [...SHARE_ADAPT, 'use it for any purpose, including commercially'],
    requires: ['attribute the source'],
  },
  'PDDL-1.0': {
    name: 'Open Data Commons Public Domain Dedication and License 1.0',
    allows: [...SHARE_ADAPT, 'use it for any purpose, including commercially'],
    requires: ['nothing; citing the dataset is still good scientific practice'],
  },
}

/** The terms of a licence, or a pointer to its text when it is not one of the common ones. */
export function licenceTerms(spdxId: string): LicenceTerms {
  return (
    LICENCE_TERMS[spdxId] ?? {
      name: spdxId,
      allows: ['what the licence text allows (follow the link)'],
      requires: ['what the licence text requires'],
    }
  )
}
