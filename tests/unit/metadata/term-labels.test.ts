import { describe, expect, it } from 'vitest'
import * as omeTerms from '@shared/metadata/ome-terms'
import { SMLM_TECHNIQUES, ILLUMINATIONS } from '@shared/metadata/acquisition.schema'
import { termLabel } from '@shared/metadata/term-labels'

const omeLists: (readonly string[])[] = Object.values(omeTerms).filter((v) => Array.isArray(v))

describe('termLabel', () => {
  it('gives the words a person would use for the OME identifiers the form offers', () => {
    expect(termLabel('IntensifiedCCD')).toBe('Intensified CCD')
    expect(termLabel('WaterDipping')).toBe('Water dipping')
    expect(termLabel('LightEmittingDiode')).toBe('LED')
    expect(termLabel('SolidState')).toBe('Solid state')
    expect(termLabel('2x2')).toBe('2 × 2')
  })

  it('leaves no CamelCase identifier on screen, for every OME enumeration value', () => {
    const values = omeLists.flat()
    expect(values.length).toBeGreaterThan(60)
    for (const value of values) expect(termLabel(value)).not.toMatch(/[a-z][A-Z][a-z]/)
  })

  it('keeps values that are already words as they are', () => {
    for (const value of [...SMLM_TECHNIQUES, ...ILLUMINATIONS]) expect(termLabel(value)).toBe(value)
  })
})
