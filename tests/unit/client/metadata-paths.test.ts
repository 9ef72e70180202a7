import { describe, expect, it } from 'vitest'
import { ApiError } from '@/api/client'
import { checkCore, checkDraft, messagesAt, messagesByPath } from '@/utils/metadataIssues'
import {
  cleanDocument,
  fieldId,
  filledLeaves,
  getAt,
  setAt,
  suggestionKey,
  type Draft,
} from '@/utils/metadataPaths'
import { describePath, metadataVocabulary, nodeAt } from '@/utils/metadataVocabulary'

const schema = metadataVocabulary()

describe('paths into a metadata document', () => {
  it('writes nested paths, creating lists where the next key is an index', () => {
    const doc: Draft = {}
    setAt(doc, 'instrument.lightSources.1.wavelengthNm', 640)
    setAt(doc, 'instrument.objective.lensNA', 1.49)
    expect(doc).toEqual({
      instrument: { lightSources: [undefined, { wavelengthNm: 640 }], objective: { lensNA: 1.49 } },
    })
    expect(getAt(doc, 'instrument.lightSources.1.wavelengthNm')).toBe(640)
    expect(getAt(doc, 'instrument.detector.type')).toBeUndefined()
    setAt(doc, 'instrument.objective.lensNA', undefined)
    expect(doc.instrument).toEqual({
      lightSources: [undefined, { wavelengthNm: 640 }],
      objective: {},
    })
  })

  it('drops blanks and emptied groups but keeps list entries in their places', () => {
    const doc: Draft = {
      study: { keywords: ['dSTORM'], relatedPublicationDoi: '  ' },
      biosample: { organism: { name: '' } },
      labelling: [{ target: '' }, { target: 'Nup96' }],
    }
    expect(cleanDocument(doc)).toEqual({
      study: { keywords: ['dSTORM'] },
      labelling: [{}, { target: 'Nup96' }],
    })
    expect(filledLeaves(doc)).toEqual([
      ['study.keywords', ['dSTORM']],
      ['labelling.1.target', 'Nup96'],
    ])
  })

  it('turns list indices into the `*` the suggestions are keyed by', () => {
    expect(suggestionKey('labelling.3.target')).toBe('labelling.*.target')
    expect(suggestionKey('biosample.structure')).toBe('biosample.structure')
    expect(fieldId('instrument.objective.lensNA')).toBe('md-instrument-objective-lensNA')
  })

  it('names a field by its place in the schema', () => {
    expect(describePath(schema, 'instrument.objective.lensNA')).toBe(
      'Instrument › Objective › Numerical aperture (NA)',
    )
    expect(describePath(schema, 'study.authors.0.orcid')).toBe('Study › Author 1 › ORCID iD')
    expect(describePath(schema, 'licence')).toBe('Study › Licence')
    expect(nodeAt(schema, 'labelling.4.probeClass')?.enum).toContain('DNA-PAINT imager')
  })
})

describe('issues mapped to fields', () => {
  it('puts the cross-field NA check under the NA field', () => {
    // Water's refractive index is 1.333 (handbook value), so NA 1.49 cannot be reached in water.
    const check = checkDraft({ instrument: { objective: { lensNA: 1.49, immersion: 'Water' } } })
    expect(check.ok).toBe(false)
    expect(check.errors['instrument.objective.lensNA']).toBe(
      'An NA of 1.49 is not possible with water immersion (refractive index 1.333)',
    )
    expect(checkDraft({ instrument: { objective: { lensNA: 1.49, immersion: 'Oil' } } }).ok).toBe(
      true,
    )
  })

  it('keys list items by index and keeps the schema’s own words', () => {
    const check = checkDraft({
      // 0000-0002-1825-0097 is ORCID's documented sample iD; a changed check digit must fail.
      study: {
        authors: [{ name: 'A Tester' }, { name: 'B Tester', orcid: '0000-0002-1825-0098' }],
      },
      acquisition: { frames: 'many' },
    })
    expect(Object.keys(check.errors).sort()).toEqual([
      'acquisition.frames',
      'study.authors.1.orcid',
    ])
    expect(check.errors['acquisition.frames']).toBe('Frames must be a number (frames)')
  })

  it('shows the server’s pointers exactly where zod’s paths go', () => {
    const error = new ApiError({
      status: 400,
      title: 'Invalid request',
      errors: [
        { pointer: '#/instrument/objective/lensNA', detail: 'From the server' },
        { pointer: '#/study/keywords/2', detail: 'Keyword can have at most 80 characters' },
      ],
    })
    const local = messagesByPath([
      { path: ['instrument', 'objective', 'lensNA'], message: 'Local' },
    ])
    expect(Object.keys(error.fieldErrors)).toContain(Object.keys(local)[0])
    expect(messagesAt(error.fieldErrors, 'instrument.objective.lensNA')).toEqual([
      'From the server',
    ])
    // A chip list shows the complaints about its items too.
    expect(messagesAt(error.fieldErrors, 'study.keywords')).toEqual([])
    expect(messagesAt(error.fieldErrors, 'study.keywords', true)).toEqual([
      'Keyword can have at most 80 characters',
    ])
  })

  it('checks title, description and licence as the dataset update would', () => {
    expect(checkCore({ title: 'ab', description: '', licence: 'CC-BY-4.0' })).toEqual({
      title: 'Title needs at least 3 characters',
    })
    expect(
      checkCore({ title: 'Pores', description: '', licence: 'not-a-licence' }).licence,
    ).toMatch(/SPDX/)
    expect(checkCore({ title: 'Pores', description: '', licence: '' })).toEqual({})
  })
})
