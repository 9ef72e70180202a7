import type { EntityManager } from '@mikro-orm/better-sqlite'
import { accessPhase } from '@shared/domain/dataset-state'
import { licenceTerms, type LicenceTerms } from '@shared/domain/licence-terms'
import type { DatasetQualityItem } from '@shared/schemas/quality.schema'
import { defineAbilityFor } from '@shared/permissions/abilities'
import { findDataset, subjectOf } from '../datasets/dataset-access'
import { toDatasetPageDto } from '../datasets/dataset.mapper'
import { exportSubject } from '../metadata/metadata.service'
import { toJsonLd } from '../metadata/exports/json-ld'
import type { DatasetExportSubject } from '../metadata/exports/export-subject'
import { datasetQualityOf } from '../quality/dataset-quality.service'
import { citationsOf, type Citations } from './citations'
import { versionsOf, type LandingVersion } from './landing-versions'

/** The public page's three forms: open (files and quality), under embargo, or a tombstone. */
export type LandingKind = 'open' | 'embargoed' | 'withdrawn'

/** Everything the landing page shows, already cut down to what the public may see. */
export interface LandingView {
  kind: LandingKind
  subject: DatasetExportSubject
  /** The version this page is about, and all of them. */
  version: LandingVersion
  versions: LandingVersion[]
  pageUrl: string
  appUrl: string
  licence: LicenceTerms & { id: string; url: string }
  citations: Citations
  availability: string
  jsonLd: Record<string, unknown> | null
  quality: DatasetQualityItem[]
  withdrawal: { reason: string; at: string } | null
}

const day = (d: Date) => d.toISOString().slice(0, 10)

/**
 * The public landing page of an accession (and version), seen as the public sees it whatever
 * the visitor's own rights: the public's abilities decide. null: unknown, not yet approved, or
 * not such a version; the page then says only that (a 404 that tells nothing).
 */
export async function landingView(
  em: EntityManager,
  publicUrl: string,
  accession: string,
  versionNumber: number | null,
  now: Date,
): Promise<LandingView | null> {
  const dataset = await findDataset(em, accession)
  if (!dataset || /^\d+$/.test(accession)) return null
  const publicAbility = defineAbilityFor(null, now)
  if (!publicAbility.can('read', subjectOf(dataset))) return null
  const versions = versionsOf(dataset)
  const version =
    versionNumber === null ? versions[0] : versions.find((v) => v.number === versionNumber)
  if (!version) return null

  const phase = accessPhase(dataset, now)
  const kind: LandingKind =
    phase === 'withdrawn' ? 'withdrawn' : phase === 'released' ? 'open' : 'embargoed'
  const base = `${publicUrl}/d/${dataset.accession}`
  const pageUrl = versionNumber === null ? base : `${base}/v/${version.number}`
  const loaded = await exportSubject(em, dataset, publicUrl)
  // Files are part of the page only when the public may download them.
  const filesOpen = kind === 'open' && publicAbility.can('download', subjectOf(dataset))
  const subject: DatasetExportSubject = {
    ...loaded,
    landingUrl: `${base}/v/${version.number}`,
    version: version.number,
    files: filesOpen ? loaded.files : [],
  }
  const authors = (subject.metadata.study?.authors ?? []).flatMap((a) => (a.name ? [a.name] : []))
  const published = kind === 'embargoed' ? subject.embargoUntil : version.approvedAt
  const citations = citationsOf({
    accession: subject.accession,
    title: subject.title,
    authors,
    fallbackAuthor: subject.projectName,
    version: version.number,
    published,
    url: subject.landingUrl,
  })
  const previewOpen = kind === 'open' && publicAbility.can('preview', subjectOf(dataset))
  const quality = previewOpen
    ? (await datasetQualityOf(em, dataset.id)).items.filter((i) => i.status === 'done')
    : []
  const withdrawal =
    kind === 'withdrawn' ? ((await toDatasetPageDto(em, dataset)).stewardNote ?? null) : null

  return {
    kind,
    subject,
    version,
    versions,
    pageUrl,
    appUrl: `${publicUrl}/datasets/${dataset.accession}`,
    licence: {
      ...licenceTerms(subject.licence),
      id: subject.licence,
      url: `https://spdx.org/licenses/${subject.licence}.html`,
    },
    citations,
    availability: availabilitySentence(subject, kind),
    jsonLd: kind === 'withdrawn' ? null : toJsonLd(subject, now),
    quality,
    withdrawal: withdrawal
      ? { reason: withdrawal.comment || 'No reason was recorded.', at: withdrawal.at.slice(0, 10) }
      : null,
  }
}

/** A sentence a manuscript's data availability statement can take as it is. */
function availabilitySentence(s: DatasetExportSubject, kind: LandingKind): string {
  const where = `in Stipple at ${s.landingUrl} (accession ${s.accession}, version ${s.version})`
  const licence = `under the ${s.licence} licence`
  if (kind === 'embargoed' && s.embargoUntil)
    return `The single-molecule localization microscopy data supporting this study will be openly available ${where} from ${day(s.embargoUntil)}, ${licence}.`
  return `The single-molecule localization microscopy data supporting this study are openly available ${where}, ${licence}.`
}
