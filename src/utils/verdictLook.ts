import {
  mdiAlertCircleOutline,
  mdiCheckCircleOutline,
  mdiInformationOutline,
  mdiMinusCircleOutline,
} from '@mdi/js'
import { VERDICT_TONE_LABELS, type VerdictTone } from '@shared/domain/quality-verdicts'

/** How a verdict's tone shows: an icon and a colour beside its words, never colour alone. */
export const VERDICT_LOOK: Record<VerdictTone, { icon: string; color: string; label: string }> = {
  good: { icon: mdiCheckCircleOutline, color: 'success', label: VERDICT_TONE_LABELS.good },
  fair: { icon: mdiMinusCircleOutline, color: 'warning', label: VERDICT_TONE_LABELS.fair },
  poor: { icon: mdiAlertCircleOutline, color: 'error', label: VERDICT_TONE_LABELS.poor },
  note: { icon: mdiInformationOutline, color: 'info', label: VERDICT_TONE_LABELS.note },
}
