import type { DatasetDto } from '../schemas/dataset.schema'
import { accessPhase, type AccessPhase } from './dataset-state'

/** What the dataset page says about where a dataset stands and what happens next. */
export interface DatasetNextStep {
  phase: AccessPhase
  /** How the page colours it: a step to take, a wait, something done, something ended. */
  tone: 'info' | 'warning' | 'success' | 'error'
  title: string
  text: string
}

export interface NextStepFacts {
  /** Required description fields still empty; null while the description is not loaded. */
  requiredMissing?: number | null
  /** How a calendar day or a timestamp reads on screen; a fixed English long date by default. */
  formatDate?: (value: string) => string
  now?: Date
}

const DAY = /^\d{4}-\d{2}-\d{2}$/
const longDate = new Intl.DateTimeFormat('en-GB', {
  day: 'numeric',
  month: 'long',
  year: 'numeric',
  timeZone: 'UTC',
})
/** Days are UTC midnights (an embargo ends at 00:00 UTC), so UTC reads them as the same day. */
export const formatLongDate = (value: string): string =>
  longDate.format(new Date(DAY.test(value) ? `${value}T00:00:00Z` : value))

const plural = (n: number, one: string, many: string) => `${n} ${n === 1 ? one : many}`

type Dataset = Pick<
  DatasetDto,
  'accession' | 'state' | 'embargoUntil' | 'submittedAt' | 'approvedAt' | 'version'
> &
  Partial<Pick<DatasetDto, 'stewardNote'>>

function draftStep(requiredMissing: number | null | undefined): Omit<DatasetNextStep, 'phase'> {
  if (requiredMissing == null)
    return {
      tone: 'info',
      title: 'Draft',
      text: 'Describe the experiment and add its files, then submit it for curation.',
    }
  if (requiredMissing > 0)
    return {
      tone: 'warning',
      title: 'Draft: description incomplete',
      text: `${plural(requiredMissing, 'required field is', 'required fields are')} still empty. Fill them, then submit the dataset for curation.`,
    }
  return {
    tone: 'info',
    title: 'Ready to submit',
    text: 'Every required field is filled. Submit the dataset for curation when its files are in place.',
  }
}

/**
 * The one place the dataset page's status text is written: for each state (and, once approved,
 * whether its embargo has ended) where the dataset stands and what comes next.
 */
export function datasetNextStep(dataset: Dataset, facts: NextStepFacts = {}): DatasetNextStep {
  const date = facts.formatDate ?? formatLongDate
  const embargoUntil = dataset.embargoUntil ? new Date(`${dataset.embargoUntil}T00:00:00Z`) : null
  const phase = accessPhase({ state: dataset.state, embargoUntil }, facts.now)
  const note = dataset.stewardNote?.comment.trim() ?? ''
  const on = (value: string | null | undefined) => (value ? ` on ${date(value)}` : '')

  switch (phase) {
    case 'draft':
      return { phase, ...draftStep(facts.requiredMissing) }
    case 'submitted':
      return {
        phase,
        tone: 'info',
        title: 'Waiting for a data steward',
        text: `Submitted${on(dataset.submittedAt)}. A data steward checks it and approves it or asks for changes; it cannot be edited meanwhile.`,
      }
    case 'changes_requested':
      return {
        phase,
        tone: 'warning',
        title: 'Changes requested',
        text: note
          ? `A data steward asked for changes${on(dataset.stewardNote?.at)}: “${note}” Make them, then submit the dataset again.`
          : 'A data steward asked for changes (their message went to the depositor by e-mail). Make them, then submit the dataset again.',
      }
    case 'embargoed':
      return {
        phase,
        tone: 'info',
        title: `Under embargo until ${date(dataset.embargoUntil!)}`,
        text: `Approved${on(dataset.approvedAt)} as version ${dataset.version}. Its description is public now; its files open to everyone on ${date(dataset.embargoUntil!)}.`,
      }
    case 'released': {
      // An embargo that has ended made it public on its date; without one, approval did.
      const since = dataset.embargoUntil ?? dataset.approvedAt
      return {
        phase,
        tone: 'success',
        title: since ? `Public since ${date(since)}` : 'Public',
        text: `Version ${dataset.version} is released: anyone can read, cite and download it as ${dataset.accession}.`,
      }
    }
    case 'withdrawn':
      return {
        phase,
        tone: 'error',
        title: `Withdrawn${on(dataset.stewardNote?.at)}`,
        text: `${note ? `Reason: “${note}” ` : ''}This page stays so that citations of ${dataset.accession} still lead somewhere; the data is no longer offered.`,
      }
  }
}
