import { z } from 'zod'
import { field } from './field'
import { quantity, text } from './quantities'

/** NCBI Taxonomy id of Homo sapiens: such samples need an ethics or consent reference. */
export const HUMAN_TAXON_ID = 9606

export const organismSchema = z.object({
  name: field(text('Organism', 200), {
    tier: 'required',
    label: 'Organism',
    help: 'Scientific name, e.g. Homo sapiens',
    suggest: true,
  }),
  taxonId: field(quantity('Taxon id', '', 1, 1e8, { int: true }), {
    tier: 'recommended',
    label: 'NCBI Taxonomy id',
    help: 'e.g. 9606 for Homo sapiens, 10090 for Mus musculus',
  }),
})

/** REMBI "Biosample" and "Specimen". */
export const biosampleSchema = z.object({
  organism: field(organismSchema, {
    tier: 'required',
    label: 'Organism',
    term: 'REMBI Biosample: organism',
  }),
  cellType: field(text('Cell type', 200), {
    tier: 'recommended',
    label: 'Cell type',
    suggest: true,
  }),
  cellLine: field(text('Cell line', 200), { tier: 'optional', label: 'Cell line', suggest: true }),
  structure: field(text('Structure', 200), {
    tier: 'required',
    label: 'Structure imaged',
    help: 'e.g. nuclear pore complex, microtubules, synapse',
    suggest: true,
  }),
  preparation: field(text('Preparation', 2000), {
    tier: 'recommended',
    label: 'Sample preparation',
    multiline: true,
    term: 'REMBI Specimen: preparation',
  }),
  fixation: field(text('Fixation', 500), {
    tier: 'recommended',
    label: 'Fixation',
    help: 'e.g. 4 % PFA, 15 min; or "live"',
    suggest: true,
  }),
  ethicsReference: field(text('Ethics reference', 300), {
    tier: 'optional',
    label: 'Ethics approval or consent reference',
    help: 'Required for human-derived samples. Stipple defers to your institution’s ethics board and data protection rules.',
  }),
})
export type BiosampleMetadata = z.infer<typeof biosampleSchema>

export function isHumanDerived(b: BiosampleMetadata | undefined): boolean {
  const o = b?.organism
  return o?.taxonId === HUMAN_TAXON_ID || /^homo\s+sapiens\b/i.test(o?.name?.trim() ?? '')
}
