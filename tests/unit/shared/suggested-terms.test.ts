/** The vocabulary shipped for organism and fluorophore suggestions (issue 16, point 9). */
import { describe, expect, it } from 'vitest'
import { FLUOROPHORES, ORGANISMS, taxonIdOf } from '@shared/metadata/suggested-terms'

describe('shipped suggestions', () => {
  it('name organisms by binomial scientific name, each once', () => {
    for (const o of ORGANISMS) expect(o.name).toMatch(/^[A-Z][a-z]+ [a-z]+( [a-z]+)?$/)
    expect(new Set(ORGANISMS.map((o) => o.name)).size).toBe(ORGANISMS.length)
  })

  it('know the taxon ids of the organisms the form names in its help (NCBI Taxonomy)', () => {
    expect(taxonIdOf('Homo sapiens')).toBe(9606)
    expect(taxonIdOf('  mus MUSCULUS ')).toBe(10090)
    expect(taxonIdOf('Danio rerio')).toBe(7955)
    expect(taxonIdOf('Homo')).toBeNull()
  })

  it('list fluorophores by generic name, not by product line', () => {
    // Every dye is named by its chemical family, every protein by its published name; a product
    // line's name fits neither.
    const chemicalFamily = /cyanine|rhodamine|pyronine|oxazine|fluorescein|nile red/i
    const proteinName = /^(m[A-Z]|td|PA-?|rs|E?GFP|Dronpa|Dendra|Skylan)/
    const unnamed = FLUOROPHORES.filter((f) => !chemicalFamily.test(f) && !proteinName.test(f))
    expect(unnamed).toEqual([])
    expect(FLUOROPHORES).toEqual(expect.arrayContaining(['mEos3.2', 'Cyanine 5']))
  })
})
