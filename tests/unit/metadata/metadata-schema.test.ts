import { describe, expect, it } from 'vitest'
import { computeCompleteness } from '@shared/metadata/completeness'
import { metadataSchema } from '@shared/metadata/metadata.schema'
import { metadataJsonSchema } from '@shared/metadata/vocabulary'
import { completeMetadata } from '../../fixtures/metadata'

const issuesOf = (doc: unknown) => {
  const r = metadataSchema.safeParse(doc)
  return r.success ? [] : r.error.issues.map((i) => `${i.path.join('.')}: ${i.message}`)
}

describe('metadata validation', () => {
  it('accepts the complete fixture', () => {
    expect(issuesOf(completeMetadata())).toEqual([])
  })

  it('rejects an ORCID iD whose ISO 7064 MOD 11-2 check character is wrong', () => {
    // 0000-0002-1825-0097 is the sample iD of ORCID's identifier documentation; ...0098 breaks its checksum.
    const bad = { study: { authors: [{ name: 'A', orcid: '0000-0002-1825-0098' }] } }
    expect(issuesOf(bad)[0]).toMatch(/^study\.authors\.0\.orcid: .*check character/)
  })

  it('rejects a malformed DOI', () => {
    expect(issuesOf({ study: { relatedPublicationDoi: '11.1234/abc' } })[0]).toMatch(
      /^study\.relatedPublicationDoi/,
    )
  })

  it('rejects an NA above the refractive index of the immersion medium', () => {
    // Water n = 1.333 (handbook value): NA 1.49 is only reachable with oil.
    const doc = { instrument: { objective: { lensNA: 1.49, immersion: 'Water' } } }
    expect(issuesOf(doc)).toEqual([
      expect.stringMatching(/^instrument\.objective\.lensNA: .*not possible with water immersion/),
    ])
    expect(issuesOf({ instrument: { objective: { lensNA: 1.49, immersion: 'Oil' } } })).toEqual([])
  })

  it.each([
    [
      { acquisition: { emissionWavelengthNm: 150 } },
      /acquisition\.emissionWavelengthNm: .*less than 200 nm/,
    ],
    [{ acquisition: { emissionWavelengthNm: 2500 } }, /above 2000 nm/],
    [{ instrument: { detector: { pixelSizeNm: 0 } } }, /pixelSizeNm: .*more than 0 nm/],
    [{ acquisition: { frames: -3 } }, /frames/],
    [{ acquisition: { frames: 10.5 } }, /whole number/],
    [{ instrument: { objective: { immersion: 'Honey' } } }, /immersion/],
  ])('rejects %o', (doc, message) => {
    expect(issuesOf(doc).join('\n')).toMatch(message)
  })
})

describe('completeness', () => {
  it('is 100 % and ready for the complete fixture with title, description and licence', () => {
    const c = computeCompleteness(metadataSchema.parse(completeMetadata()), {
      title: 'T',
      description: 'D',
      licence: 'CC-BY-4.0',
    })
    expect(c.readyToSubmit).toBe(true)
    expect(c.score).toBe(100)
    expect(c.sections.flatMap((s) => s.missing)).toEqual([])
  })

  it('lists what is missing per section and rises as fields are filled', () => {
    const empty = computeCompleteness({}, {})
    expect(empty.readyToSubmit).toBe(false)
    const instrument = empty.sections.find((s) => s.section === 'instrument')!
    expect(instrument.missing.filter((m) => m.tier === 'required').map((m) => m.path)).toEqual([
      'instrument.objective.nominalMagnification',
      'instrument.objective.lensNA',
      'instrument.objective.immersion',
      'instrument.lightSources',
      'instrument.detector.type',
      'instrument.detector.pixelSizeNm',
    ])
    const some = computeCompleteness(
      { instrument: { objective: { lensNA: 1.49, nominalMagnification: 100, immersion: 'Oil' } } },
      {},
    )
    expect(some.score).toBeGreaterThan(empty.score)
    expect(some.required.filled).toBe(empty.required.filled + 3)
  })

  it('requires an ethics reference for human-derived samples', () => {
    const doc = metadataSchema.parse(completeMetadata())
    doc.biosample = { ...doc.biosample, organism: { name: 'Homo sapiens', taxonId: 9606 } }
    const c = computeCompleteness(doc, { title: 'T', description: 'D', licence: 'CC0-1.0' })
    expect(c.readyToSubmit).toBe(false)
    expect(c.sections.find((s) => s.section === 'biosample')!.missing).toEqual([
      {
        path: 'biosample.ethicsReference',
        label: 'Ethics approval or consent reference',
        tier: 'required',
      },
    ])
  })

  it('recommends the EM gain for an EMCCD camera only', () => {
    const doc = metadataSchema.parse(completeMetadata())
    delete doc.instrument!.detector!.emGain
    const missing = (d: typeof doc) =>
      computeCompleteness(d, {})
        .sections.find((s) => s.section === 'instrument')!
        .missing.map((m) => m.path)
    expect(missing(doc)).toContain('instrument.detector.emGain')
    doc.instrument!.detector!.type = 'CMOS'
    expect(missing(doc)).not.toContain('instrument.detector.emGain')
  })
})

describe('the vocabulary', () => {
  it('is JSON Schema 2020-12 with tiers, units and OME terms on the fields', () => {
    const js = metadataJsonSchema() as {
      $schema: string
      properties: Record<string, { properties: Record<string, Record<string, unknown>> }>
    }
    expect(js.$schema).toBe('https://json-schema.org/draft/2020-12/schema')
    const objective = js.properties.instrument!.properties.objective as {
      properties: Record<string, Record<string, unknown>>
    }
    expect(objective.properties.lensNA).toMatchObject({
      'x-tier': 'required',
      'x-term': 'OME Objective@LensNA',
      title: 'Numerical aperture (NA)',
    })
    expect(js.properties.instrument!.properties.detector).toBeDefined()
    const detector = js.properties.instrument!.properties.detector as {
      properties: Record<string, Record<string, unknown>>
    }
    expect(detector.properties.pixelSizeNm).toMatchObject({ 'x-unit': 'nm' })
  })
})
