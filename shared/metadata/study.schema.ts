import { z } from 'zod'
import { doiSchema, orcidSchema } from '../domain/identifiers'
import { field, group } from './field'
import { text } from './quantities'

export const authorSchema = z.object({
  name: field(text('Name', 200), { tier: 'required', label: 'Name', term: 'REMBI Study: author' }),
  orcid: field(orcidSchema, {
    tier: 'recommended',
    label: 'ORCID iD',
    help: 'For example 0000-0002-1825-0097',
  }),
  affiliation: field(text('Affiliation', 300), { tier: 'recommended', label: 'Affiliation' }),
})

export const fundingSchema = z.object({
  funder: field(text('Funder', 300), { tier: 'required', label: 'Funder' }),
  grantId: field(text('Grant', 100), { tier: 'optional', label: 'Grant number' }),
})

/**
 * REMBI "Study". The dataset's title, description and SPDX licence live on the dataset record
 * itself and count towards this section's completeness.
 */
export const studySchema = z.object({
  keywords: group(z.array(text('Keyword', 80)).max(30), { tier: 'recommended', label: 'Keywords' }),
  authors: group(z.array(authorSchema).max(100), {
    tier: 'required',
    label: 'Authors',
    term: 'REMBI Study: authors',
  }),
  funding: group(z.array(fundingSchema).max(30), { tier: 'optional', label: 'Funding' }),
  relatedPublicationDoi: field(doiSchema, {
    tier: 'recommended',
    label: 'Related publication (DOI)',
    help: 'For example 10.1000/xyz123',
  }),
})
export type StudyMetadata = z.infer<typeof studySchema>
