import type { EntityManager } from '@mikro-orm/better-sqlite'
import { accessPhase } from '@shared/domain/dataset-state'
import { landingPath } from '@shared/domain/landing'
import { licenceTerms, type LicenceTerms } from '@shared/domain/licence-terms'
import type { DatasetQualityItem } from '@shared/schemas/quality.schema'
import { defineAbilityFor } from '@shared/permissions/abilities'
import { findDataset, subjectOf } from '../datasets/dataset-access'
import { asReleased } from '../versions/version-access'
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
  /** The dataset in the app; null for a reviewer whose link shows this frozen version only. */
  appUrl: string | null
  licence: LicenceTerms & { id: string; url: string }
  citations: Citations
  availability: string
  jsonLd: Record<string, unknown> | null
  quality: DatasetQualityItem[]
  withdrawal: { reason: string; at: string } | null
  /** Files shown to this visitor only, through a reviewer link: the page is not for caches. */
  forReviewer: boolean
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
  /** The version a reviewer link held by this visitor opens on a dataset (files shown), if any. */
  reviewedVersion: (datasetId: number) => number | null = () => null,
): Promise<LandingView | null> {
  const dataset = await findDataset(em, accession)
  if (!dataset || /^\d+$/.test(accession)) return null
  const versions = await versionsOf(em, dataset)
  // While a next version is being prepared, the approved one keeps its public page.
  const standing = versions.length ? asReleased(dataset) : subjectOf(dataset)
  const publicAbility = defineAbilityFor(null, now)
  if (!publicAbility.can('read', standing)) return null
  const version =
    versionNumber === null ? versions[0] : versions.find((v) => v.number === versionNumber)
  if (!version) return null

  const phase = accessPhase(standing, now)
  const kind: LandingKind =
    phase === 'withdrawn' ? 'withdrawn' : phase === 'released' ? 'open' : 'embargoed'
  const urlOf = (n?: number) => `${publicUrl}${landingPath(dataset.accession, n)}`
  const pageUrl = urlOf(versionNumber === null ? undefined : version.number)
  const loaded = await exportSubject(em, dataset, publicUrl)
  // Files are part of the page only when the public may download them, or for the reviewer
  // holding a link to this very version.
  const publicFiles = kind === 'open' && publicAbility.can('download', standing)
  const forReviewer =
    !publicFiles && kind !== 'withdrawn' && reviewedVersion(dataset.id) === version.number
  const filesOpen = publicFiles || forReviewer
  const subject: DatasetExportSubject = {
    ...loaded,
    ...(version.frozen
      ? {
          title: version.frozen.title,
          description: version.frozen.description,
          licence: version.frozen.licence,
          metadata: version.frozen.metadata,
          files: frozenFiles(version.frozen.files, loaded.files, (id) =>
            versionFileUrl(publicUrl, dataset.accession, version.number, id),
          ),
        }
      : {}),
    landingUrl: urlOf(version.number),
    version: version.number,
  }
  if (!filesOpen) subject.files = []
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
    doi: version.doi,
  })
  const previewOpen = kind === 'open' && publicAbility.can('preview', standing)
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
    appUrl:
      forReviewer && version.number < dataset.version
        ? null
        : `${publicUrl}/datasets/${dataset.accession}`,
    licence: {
      ...licenceTerms(subject.licence),
      id: subject.licence,
      url: `https://spdx.org/licenses/${subject.licence}.html`,
    },
    citations,
    availability: availabilitySentence(subject, kind),
    jsonLd: kind === 'withdrawn' ? null : jsonLdOf(subject, version.doi, now),
    quality,
    withdrawal: withdrawal
      ? { reason: withdrawal.comment || 'No reason was recorded.', at: withdrawal.at.slice(0, 10) }
      : null,
    forReviewer,
  }
}

/** schema.org JSON-LD of the version: only files that can be fetched, the DOI when registered. */
function jsonLdOf(subject: DatasetExportSubject, doi: string | null, now: Date) {
  const ld = toJsonLd({ ...subject, files: subject.files.filter((f) => f.url) }, now)
  if (!doi) return ld
  const doiUrl = `https://doi.org/${doi}`
  return { ...ld, identifier: [doiUrl, ...ld.identifier], sameAs: doiUrl }
}

const versionFileUrl = (publicUrl: string, accession: string, n: number, fileId: number) =>
  `${publicUrl}/api/datasets/${accession}/versions/${n}/files/${fileId}/content`

/**
 * A version's frozen file list, each linked to its frozen bytes (kept by checksum, whatever
 * later drafts do to the dataset's own files).
 */
function frozenFiles(
  files: { id: number; name: string; size: number; sha256: string }[],
  current: DatasetExportSubject['files'],
  urlOf: (fileId: number) => string,
): DatasetExportSubject['files'] {
  return files.map(({ id, ...f }) => ({
    ...f,
    mediaType: current.find((c) => c.sha256 === f.sha256)?.mediaType ?? null,
    url: urlOf(id),
  }))
}

/** A sentence a manuscript's data availability statement can take as it is. */
function availabilitySentence(s: DatasetExportSubject, kind: LandingKind): string {
  const where = `in Stipple at ${s.landingUrl} (accession ${s.accession}, version ${s.version})`
  const licence = `under the ${s.licence} licence`
  if (kind === 'embargoed' && s.embargoUntil)
    return `The single-molecule localization microscopy data supporting this study will be openly available ${where} from ${day(s.embargoUntil)}, ${licence}.`
  return `The single-molecule localization microscopy data supporting this study are openly available ${where}, ${licence}.`
}
