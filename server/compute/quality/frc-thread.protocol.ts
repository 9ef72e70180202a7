import type { DriftTrajectory } from '../drift'
import type { FrcResult } from '../frc'
import type { Localizations } from '../localizations.types'

/** What FRC reads of a table (positions, frames for the time blocks, precision for the correction). */
export type FrcColumns = Pick<Localizations, 'count' | 'x' | 'y' | 'frame' | 'uncertainty'>

export type FrcThreadRequest =
  { type: 'table'; locs: FrcColumns } | { type: 'drift'; trajectory: DriftTrajectory | null }

export type FrcThreadReply =
  | { type: 'frc'; result: FrcResult }
  | { type: 'frcCorrected'; result: FrcResult | null }
  | { type: 'failed'; message: string }
