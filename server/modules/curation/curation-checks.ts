import type { EntityManager } from '@mikro-orm/better-sqlite'
import { isHumanDerived } from '@shared/metadata/biosample.schema'
import { computeCompleteness } from '@shared/metadata/completeness'
import { isSpdxLicenceId } from '@shared/domain/licences'
import {
  CURATION_CHECK_LABELS,
  type CurationChecklist,
  type CurationCheckDto,
  type CurationCheckKey,
  type CheckOutcome,
} from '@shared/schemas/curation.schema'
import { ConflictError, ValidationError } from '../../errors/http-error'
import type { IDataset } from '../datasets/dataset.entity'
import { DatasetFile } from '../files/dataset-file.entity'
import { metadataOf } from '../metadata/metadata.service'
import { QualityReport } from '../quality/quality-report.entity'

const DAY_MS = 86_400_000

const check = (key: CurationCheckKey, outcome: CheckOutcome, detail: string): CurationCheckDto => ({
  key,
  label: CURATION_CHECK_LABELS[key],
  outcome,
  detail,
})
const plural = (n: number, word: string) => `${n} ${word}${n === 1 ? '' : 's'}`

/**
 * What Stipple can tell the steward about each item of the curation checklist, as of `now`.
 * `embargoUntil` is the embargo the approval would set (the proposal when not given).
 */
export async function curationChecks(
  em: EntityManager,
  dataset: IDataset,
  policy: { maxYears: number },
  now: Date,
  embargoUntil: Date | null = dataset.embargoUntil ?? dataset.proposedEmbargoUntil ?? null,
): Promise<CurationCheckDto[]> {
  const metadata = await metadataOf(em, dataset.id)
  const completeness = computeCompleteness(metadata, dataset)
  const missing = completeness.sections.flatMap((s) =>
    s.missing.filter((f) => f.tier === 'required'),
  )
  const tables = await em.find(
    DatasetFile,
    { dataset: dataset.id, kind: 'localization_table', status: 'ready' },
    { fields: ['id'] },
  )
  const reports = tables.length
    ? await em.count(QualityReport, { file: { $in: tables.map((t) => t.id) } })
    : 0
  const human = isHumanDerived(metadata.biosample)
  const ethicsReference = metadata.biosample?.ethicsReference?.trim()
  const embargoDays = embargoUntil
    ? Math.ceil((embargoUntil.getTime() - now.getTime()) / DAY_MS)
    : 0

  const latest = new Date(now)
  latest.setUTCFullYear(latest.getUTCFullYear() + policy.maxYears)
  const years = `${policy.maxYears} year${policy.maxYears === 1 ? '' : 's'}`

  return [
    missing.length
      ? check('completeness', 'fail', `${plural(missing.length, 'required field')} missing.`)
      : check('completeness', 'pass', 'Every required field is filled.'),
    !tables.length
      ? check('quality', 'not_applicable', 'No localization table, so no quality report.')
      : reports < tables.length
        ? check(
            'quality',
            'fail',
            `${plural(tables.length - reports, 'localization table')} without a quality report yet.`,
          )
        : check('quality', 'pass', `${plural(reports, 'quality report')} to read.`),
    isSpdxLicenceId(dataset.licence)
      ? check('licence', 'pass', `${dataset.licence} (SPDX).`)
      : check('licence', 'fail', `"${dataset.licence}" is not an SPDX licence identifier.`),
    !human
      ? check('ethics', 'not_applicable', 'The sample is not human-derived.')
      : ethicsReference
        ? check('ethics', 'pass', `Human-derived sample; reference: ${ethicsReference}.`)
        : check('ethics', 'fail', 'Human-derived sample without an ethics or consent reference.'),
    embargoDays <= 0
      ? check('embargo', 'pass', 'No embargo: public on approval.')
      : embargoUntil!.getTime() > latest.getTime()
        ? check(
            'embargo',
            'fail',
            `Embargo of ${embargoDays} days; the policy allows at most ${years} (until ${latest.toISOString().slice(0, 10)}).`,
          )
        : check('embargo', 'pass', `Embargo of ${embargoDays} days (policy: at most ${years}).`),
  ]
}

/**
 * Approval needs every check to pass (or not apply) and, when the steward sent the checklist,
 * every item of it ticked.
 */
export function assertApprovable(
  dataset: IDataset,
  checks: CurationCheckDto[],
  checklist: CurationChecklist | undefined,
) {
  const failed = checks.filter((c) => c.outcome === 'fail')
  if (failed.length)
    throw new ConflictError(
      `${dataset.accession} cannot be approved: ${failed.map((c) => c.label.toLowerCase()).join('; ')}.`,
      failed.map((c) => ({ pointer: `#/checklist/${c.key}`, detail: c.detail })),
    )
  if (checklist) {
    const unticked = checks.filter((c) => checklist[c.key] === false)
    if (unticked.length)
      throw new ValidationError(
        unticked.map((c) => ({
          pointer: `#/checklist/${c.key}`,
          detail: `Confirm “${c.label}” before approving, or request changes.`,
        })),
        'Tick every item of the checklist before approving.',
      )
  }
}

/** Submitting needs at least one validated (ready) file besides the complete description. */
export async function assertHasValidatedFile(em: EntityManager, dataset: IDataset) {
  if (await em.count(DatasetFile, { dataset: dataset.id, status: 'ready' })) return
  throw new ConflictError(
    `${dataset.accession} cannot be submitted yet: it has no validated file. Upload at least one file and let its check finish.`,
    [{ pointer: '#/files', detail: 'At least one validated file is required' }],
  )
}
