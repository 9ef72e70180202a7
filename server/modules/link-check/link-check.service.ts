import type { EntityManager } from '@mikro-orm/better-sqlite'
import { accessPhase } from '@shared/domain/dataset-state'
import {
  LINK_CHECK_MAX_ITEMS,
  type LinkCheckItem,
  type LinkCheckResult,
} from '@shared/schemas/link-check.schema'
import { BadRequestError } from '../../errors/http-error'
import type { Actor } from '../../services'
import { audit } from '../audit/audit.service'
import { subjectOf } from '../datasets/dataset-access'
import { Dataset, type IDataset } from '../datasets/dataset.entity'
import { DatasetFile } from '../files/dataset-file.entity'
import { completenessOf } from '../metadata/metadata.service'
import { QualityReport } from '../quality/quality-report.entity'
import { liveLinkCounts } from '../reviewer-links/reviewer-links.service'
import { extractLinks, type ExtractedLink } from './extract-links'

const EMPTY = {
  accession: null,
  title: null,
  phase: null,
  publicNow: null,
  embargoUntil: null,
  reviewerLink: null,
  completeness: null,
  files: null,
  qualityReports: null,
} as const

/**
 * Checks what a statement refers to, telling the caller exactly as much as the dataset's own page
 * would: a dataset they may not read is "not found", worded as for an accession that does not
 * exist, so the check never confirms that an unreleased dataset exists. Details (completeness,
 * files, quality) need the preview right; whether a reviewer link exists, the right to make one.
 */
export async function checkLinks(
  em: EntityManager,
  actor: Actor,
  text: string,
  { hubOrigin, now }: { hubOrigin: string; now: Date },
): Promise<LinkCheckResult> {
  const links = extractLinks(text, hubOrigin)
  if (links.length > LINK_CHECK_MAX_ITEMS)
    throw new BadRequestError(
      `This text names ${links.length} accessions and links; the check takes at most ${LINK_CHECK_MAX_ITEMS} at a time. Split it into smaller parts.`,
    )
  const datasets = await datasetsNamed(em, links)
  const readable = (link: ExtractedLink) => {
    const d = link.accession
      ? datasets.byAccession.get(link.accession)
      : link.datasetId !== null
        ? datasets.byId.get(link.datasetId)
        : undefined
    return d && actor.ability.can('read', subjectOf(d)) ? d : undefined
  }
  const live = await liveLinkCounts(
    em,
    links.map(readable).flatMap((d) => (d ? [d.id] : [])),
    now,
  )
  const items: LinkCheckItem[] = []
  for (const link of links) {
    const base = { input: link.input, kind: link.kind }
    if (link.kind === 'doi' || link.kind === 'external_url') {
      items.push({ ...base, ...EMPTY, verdict: 'unverifiable', note: UNVERIFIABLE[link.kind] })
      continue
    }
    if (!link.accession && link.datasetId === null) {
      items.push({
        ...base,
        ...EMPTY,
        verdict: 'unverifiable',
        note: 'A link to this hub that names no dataset; check it by hand.',
      })
      continue
    }
    const dataset = readable(link)
    items.push(
      dataset
        ? await describe(em, actor, dataset, base, live.get(dataset.id) ?? 0, now)
        : {
            ...base,
            ...EMPTY,
            accession: link.accession,
            verdict: 'not_found',
            note: 'No dataset you can see has this accession: it does not exist, or it is not open to you yet.',
          },
    )
  }
  audit(em, actor, {
    action: 'link_check.run',
    targetType: 'LinkCheck',
    targetId: actor.user?.id ?? 'public',
    details: {
      items: items.length,
      found: items.filter((i) => i.verdict === 'found').map((i) => i.accession),
    },
  })
  await em.flush()
  return { items, checkedAt: now.toISOString() }
}

const UNVERIFIABLE = {
  doi: 'A DOI: Stipple cannot confirm where it resolves; open it to check.',
  external_url: 'A link elsewhere: Stipple cannot verify it.',
} as const

async function datasetsNamed(em: EntityManager, links: ExtractedLink[]) {
  const accessions = links.flatMap((l) => (l.accession ? [l.accession] : []))
  const ids = links.flatMap((l) => (l.datasetId !== null ? [l.datasetId] : []))
  const rows =
    accessions.length || ids.length
      ? await em.find(Dataset, { $or: [{ accession: { $in: accessions } }, { id: { $in: ids } }] })
      : []
  return {
    byAccession: new Map(rows.map((d) => [d.accession, d])),
    byId: new Map(rows.map((d) => [d.id, d])),
  }
}

async function describe(
  em: EntityManager,
  actor: Actor,
  dataset: IDataset,
  base: Pick<LinkCheckItem, 'input' | 'kind'>,
  liveLinks: number,
  now: Date,
): Promise<LinkCheckItem> {
  const subject = subjectOf(dataset)
  const phase = accessPhase(dataset, now)
  const detailed = actor.ability.can('preview', subject)
  const item: LinkCheckItem = {
    ...base,
    ...EMPTY,
    verdict: 'found',
    accession: dataset.accession,
    title: dataset.title,
    phase,
    publicNow: phase === 'released',
    embargoUntil: phase === 'embargoed' ? dataset.embargoUntil!.toISOString().slice(0, 10) : null,
    reviewerLink: actor.ability.can('reviewer_link', subject) ? liveLinks > 0 : null,
    note: NOTES[phase],
  }
  if (!detailed) return item
  const [completeness, files] = await Promise.all([
    completenessOf(em, dataset),
    em.find(
      DatasetFile,
      { dataset: dataset.id, status: { $ne: 'rejected' } },
      { fields: ['sha256', 'kind', 'status'], disableIdentityMap: true },
    ),
  ])
  const tables = files.filter((f) => f.kind === 'localization_table' && f.status === 'ready')
  const reports = tables.length
    ? await em.count(QualityReport, { file: { $in: tables.map((f) => f.id) } })
    : 0
  return {
    ...item,
    completeness: {
      score: completeness.score,
      requiredFilled: completeness.required.filled,
      requiredTotal: completeness.required.total,
    },
    files: { total: files.length, withChecksum: files.filter((f) => f.sha256).length },
    qualityReports: { tables: tables.length, done: reports },
  }
}

const NOTES: Record<ReturnType<typeof accessPhase>, string> = {
  draft: 'Still a draft: not submitted for curation.',
  submitted: 'Submitted, awaiting curation; not public.',
  changes_requested: 'Sent back to the authors for changes; not public.',
  embargoed: 'Approved; public when the embargo ends.',
  released: 'Public now.',
  withdrawn: 'Withdrawn: only a tombstone page remains.',
}
