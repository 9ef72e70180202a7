/**
 * Frames counted from 0 or from 1, decided from the whole frame column (mapping `frameBase:
 * 'auto'`): its minimum is 0 in a 0-based table, and at least 1 in a 1-based one. The first rows
 * alone cannot tell: a 0-based table whose first frames hold no localization starts above 0.
 */
import { isSpilled, type HeldChunk } from './chunk.spill'
import type { Totals } from './ingest-report'
import { slotOf, type ParsePlan } from './parse-plan'

/**
 * The plan with the frame base settled; frames of a 1-based table are shifted in place (spilled
 * ones as they are read back).
 */
export function settleFrameBase(plan: ParsePlan, totals: Totals, chunks: HeldChunk[]) {
  const slot = slotOf(plan, 'frame')
  const stats = totals.stats[slot]
  if (!plan.frameBaseFromData || !stats) return plan
  const base = stats.count > 0 && stats.min >= 1 ? 1 : 0
  if (base === 1) {
    for (const chunk of chunks) {
      if (isSpilled(chunk)) {
        chunk.spilled[slot]!.shift += 1
        continue
      }
      const frames = chunk.columns[slot]!
      for (let i = 0; i < frames.length; i++) frames[i]! -= 1
    }
    stats.min -= 1
    stats.max -= 1
  }
  const slots = plan.slots.map((s, i) => (i === slot ? { ...s, offset: base } : s))
  return { ...plan, slots, frameBaseFromData: false }
}
