import { describe, expect, it } from 'vitest'
import {
  DOI_FORMAT_MESSAGE,
  doiSchema,
  ORCID_CHECKSUM_MESSAGE,
  ORCID_FORMAT_MESSAGE,
  orcidCheckDigit,
  orcidSchema,
  orcidUrl,
  parseDoi,
  parseOrcid,
  sameDoi,
} from '@shared/domain/identifiers'

describe('ORCID check character (ISO/IEC 7064 MOD 11-2)', () => {
  it.each([
    // DOMAIN.md 3.5 [C]: the sample iD of ORCID's identifier-structure documentation, the worked
    // example of the checksum spreadsheet linked from it, and an iD ending in X.
    ['0000-0002-1825-009', '7'],
    ['0000-0003-1415-926', '9'],
    ['0000-0002-1694-233', 'X'],
  ])('%s? → %s', (first15, check) => {
    expect(orcidCheckDigit(first15)).toBe(check)
    expect(orcidCheckDigit(first15.replaceAll('-', ''))).toBe(check)
  })

  it('needs exactly 15 digits', () => {
    expect(() => orcidCheckDigit('0000-0002-1825-00')).toThrow(/15 digits/)
    expect(() => orcidCheckDigit('0000-0002-1825-00a')).toThrow(/15 digits/)
  })
})

describe('parseOrcid', () => {
  it.each([
    ['0000-0002-1825-0097', '0000-0002-1825-0097'],
    ['https://orcid.org/0000-0002-1825-0097', '0000-0002-1825-0097'],
    ['  http://orcid.org/0000-0003-1415-9269 ', '0000-0003-1415-9269'],
    ['orcid.org/0000-0002-1694-233x', '0000-0002-1694-233X'],
  ])('reads %j as %s', (input, value) => {
    expect(parseOrcid(input)).toEqual({ ok: true, value })
  })

  it.each([
    '0000000218250097',
    '0000-0002-1825-009',
    '0000-0002-1825-00970',
    'https://example.org/0000-0002-1825-0097',
    '0000-0002-1825-009Y',
    '',
  ])('rejects the format of %j', (input) => {
    expect(parseOrcid(input)).toMatchObject({ ok: false, reason: 'format' })
  })

  it.each(['0000-0002-1825-0098', '0000-0002-1825-0079', '0000-0002-1694-2339'])(
    'rejects the checksum of %s',
    (input) => {
      expect(parseOrcid(input)).toMatchObject({ ok: false, reason: 'checksum' })
    },
  )

  it('links to the iD', () => {
    expect(orcidUrl('0000-0002-1825-0097')).toBe('https://orcid.org/0000-0002-1825-0097')
  })
})

describe('orcidSchema', () => {
  it('normalises a valid iD', () => {
    expect(orcidSchema.parse('https://orcid.org/0000-0002-1825-0097')).toBe('0000-0002-1825-0097')
  })

  it('tells a malformed iD from a mistyped one', () => {
    const format = orcidSchema.safeParse('0000-0002-1825')
    const checksum = orcidSchema.safeParse('0000-0002-1825-0098')
    expect(format.error?.issues[0]?.message).toBe(ORCID_FORMAT_MESSAGE)
    expect(checksum.error?.issues[0]?.message).toBe(ORCID_CHECKSUM_MESSAGE)
    expect(ORCID_FORMAT_MESSAGE).not.toBe(ORCID_CHECKSUM_MESSAGE)
    const issue = checksum.error?.issues[0]
    expect(issue && 'params' in issue ? issue.params : undefined).toEqual({ reason: 'checksum' })
  })

  it('says when the iD is missing', () => {
    expect(orcidSchema.safeParse(undefined).error?.issues[0]?.message).toBe(
      'An ORCID iD is required',
    )
  })
})

describe('parseDoi', () => {
  it.each([
    // 10.1000/182 is the DOI of the DOI Handbook itself (from memory).
    ['10.1000/182', '10.1000/182'],
    ['doi:10.1000/182', '10.1000/182'],
    ['DOI: 10.1000/182', '10.1000/182'],
    ['https://doi.org/10.1000/182', '10.1000/182'],
    ['http://dx.doi.org/10.1000/182', '10.1000/182'],
    // Registrant codes may be subdivided by full stops (DOI Handbook 2.2.2; example from memory).
    ['10.1000.10/123456', '10.1000.10/123456'],
    // Suffixes may hold any printable Unicode, slashes included (DOI Handbook 2.2).
    ['10.1234/Ab(c)-d;e/f_ü', '10.1234/Ab(c)-d;e/f_ü'],
    // A resolver link is a URL, so its path is percent-decoded.
    ['https://doi.org/10.1234/a%23b%2Fc', '10.1234/a#b/c'],
  ])('reads %j as %s', (input, value) => {
    expect(parseDoi(input)).toEqual({ ok: true, value })
  })

  it.each([
    '11.1000/182',
    '10./182',
    '10.abc/182',
    '10.1000',
    '10.1000/',
    '10.1000/with space',
    '10.1000/bell\u0007',
    'https://doi.org/10.1000/a%20b',
    'https://doi.org/10.1000/%E0%A4%A',
    'https://example.org/10.1000/182',
  ])('rejects %j', (input) => {
    expect(parseDoi(input)).toEqual({ ok: false, reason: 'format', message: DOI_FORMAT_MESSAGE })
  })

  it('keeps the case as written but compares without it (DOI Handbook 2.2)', () => {
    expect(parseDoi('10.1000/ABC')).toEqual({ ok: true, value: '10.1000/ABC' })
    expect(sameDoi('10.1000/ABC', '10.1000/abc')).toBe(true)
    expect(sameDoi('10.1000/abc', '10.1000/abd')).toBe(false)
  })

  it('gives the schema the same normalisation and message', () => {
    expect(doiSchema.parse('https://doi.org/10.1000/182')).toBe('10.1000/182')
    expect(doiSchema.safeParse('10.1000').error?.issues[0]?.message).toBe(DOI_FORMAT_MESSAGE)
  })
})
