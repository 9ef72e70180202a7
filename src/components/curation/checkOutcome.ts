import { mdiAlertCircleOutline, mdiCheckCircleOutline, mdiMinusCircleOutline } from '@mdi/js'
import type { CheckOutcome } from '@shared/schemas/curation.schema'

/** How each outcome of a curation check is shown: icon, colour and words for screen readers. */
export const OUTCOME_LOOK: Record<CheckOutcome, { icon: string; color: string; label: string }> = {
  pass: { icon: mdiCheckCircleOutline, color: 'success', label: 'Passes' },
  fail: { icon: mdiAlertCircleOutline, color: 'error', label: 'Blocks approval' },
  not_applicable: {
    icon: mdiMinusCircleOutline,
    color: 'medium-emphasis',
    label: 'Not applicable',
  },
}
