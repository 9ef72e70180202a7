import { z } from 'zod'
import { immersionIndexOf } from '../domain/optics'
import { acquisitionSchema } from './acquisition.schema'
import { biosampleSchema } from './biosample.schema'
import { field, group } from './field'
import { filesSchema } from './files.schema'
import { instrumentSchema } from './instrument.schema'
import { labelSchema } from './labelling.schema'
import { processingSchema } from './processing.schema'
import { studySchema } from './study.schema'

/**
 * A dataset's description, organised by REMBI's top-level sections (Study, Biosample/Specimen,
 * Image acquisition, analysed data) with the OME data model's terms for instrument and acquisition.
 * Every field is optional here so drafts can be saved as they are typed; what submitting needs is
 * decided by the tiers (see completeness.ts). Values that are present must be valid.
 */
export const metadataObjectSchema = z.object({
  study: field(studySchema, { tier: 'required', label: 'Study', term: 'REMBI Study' }),
  biosample: field(biosampleSchema, {
    tier: 'required',
    label: 'Biosample and specimen',
    term: 'REMBI Biosample, Specimen',
  }),
  labelling: group(z.array(labelSchema).max(20), {
    tier: 'required',
    label: 'Labelling',
    term: 'REMBI Specimen: signal/contrast mechanism',
  }),
  instrument: field(instrumentSchema, {
    tier: 'required',
    label: 'Instrument',
    term: 'OME Instrument',
  }),
  acquisition: field(acquisitionSchema, {
    tier: 'required',
    label: 'Acquisition',
    term: 'REMBI Image acquisition',
  }),
  processing: field(processingSchema, {
    tier: 'required',
    label: 'Localization processing',
    term: 'REMBI Analysed data',
  }),
  files: group(filesSchema, { tier: 'optional', label: 'Files', term: 'REMBI Image data' }),
})

export const METADATA_SECTIONS = [
  'study',
  'biosample',
  'labelling',
  'instrument',
  'acquisition',
  'processing',
  'files',
] as const
export type MetadataSection = (typeof METADATA_SECTIONS)[number]

export const metadataSchema = metadataObjectSchema
  .superRefine((m, ctx) => {
    const objective = m.instrument?.objective
    if (objective?.lensNA !== undefined && objective.immersion) {
      const max = immersionIndexOf(objective.immersion, objective.immersionRefractiveIndex)
      if (max !== null && objective.lensNA > max) {
        const medium =
          objective.immersionRefractiveIndex === undefined
            ? `${objective.immersion.toLowerCase()} immersion`
            : 'the immersion medium'
        ctx.addIssue({
          code: 'custom',
          path: ['instrument', 'objective', 'lensNA'],
          message: `An NA of ${objective.lensNA} is not possible with ${medium} (refractive index ${max})`,
        })
      }
    }
  })
  .meta({ id: 'DatasetMetadata' })

export type DatasetMetadata = z.infer<typeof metadataObjectSchema>
export type DatasetMetadataInput = z.input<typeof metadataObjectSchema>
