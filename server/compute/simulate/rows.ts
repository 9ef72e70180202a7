/**
 * The per-localization columns, row by row in frame order: photons, background and fitted PSF width
 * vary per localization; each position is the emitter's plus drift plus an error drawn from that
 * localization's own precision.
 */
import { thompsonPrecisionNm } from '@shared/domain/optics'
import type { Localizations } from '../localizations.types'
import type { FrameOrder } from './frame-order'
import type { DriftTrack } from './drift'
import type { EmitterPositions } from './emitters'
import type { Random } from './random'

export interface RowSettings {
  photonsMedian: number
  photonsSpread: number
  backgroundPhotons: number
  backgroundSpread: number
  psfSigmaNm: number
  psfSigmaSpread: number
  pixelNm: number
  /** Fixed lateral precision, nm, or null for Thompson 2002 per localization. */
  fixedPrecisionNm: number | null
  axialFactor: number
}

interface OpticsColumns {
  photons: Float32Array
  background: Float32Array
  sigma: Float32Array
  uncertainty: Float32Array
}

/**
 * Thompson's variance is A/N + B·b²/N² for fixed s and a; A and B come from
 * thompsonPrecisionNm itself, so the formula lives in one place and rows cost one square root.
 */
function thompsonCoefficients(s: number, a: number): { shot: number; background: number } {
  const shot = thompsonPrecisionNm({ s, a, n: 1, b2: 0 }) ** 2
  const withBackground = thompsonPrecisionNm({ s, a, n: 1, b2: 1 }) ** 2
  return { shot, background: withBackground - shot }
}

function fillOptics(count: number, settings: RowSettings, random: Random): OpticsColumns {
  const photons = new Float32Array(count)
  const background = new Float32Array(count)
  const sigma = new Float32Array(count)
  const uncertainty = new Float32Array(count)
  const { photonsMedian, photonsSpread, backgroundPhotons, backgroundSpread } = settings
  const { psfSigmaNm, psfSigmaSpread, fixedPrecisionNm } = settings
  const k = thompsonCoefficients(psfSigmaNm, settings.pixelNm)
  for (let row = 0; row < count; row++) {
    const n = random.logNormal(photonsMedian, photonsSpread)
    const b2 = random.logNormal(backgroundPhotons, backgroundSpread)
    photons[row] = n
    background[row] = b2
    sigma[row] = random.logNormal(psfSigmaNm, psfSigmaSpread)
    uncertainty[row] = fixedPrecisionNm ?? Math.sqrt(k.shot / n + (k.background * b2) / (n * n))
  }
  return { photons, background, sigma, uncertainty }
}

/** Adds drift (by frame) and an error of SD scale × the row's precision to positions in place. */
function displace(
  positions: Float64Array,
  shift: { frame: Uint32Array; by: Float64Array | null },
  error: { scale: number; precision: Float32Array; random: Random },
): void {
  const { frame, by } = shift
  const { scale, precision, random } = error
  for (let row = 0; row < positions.length; row++) {
    const drift = by === null ? 0 : (by[frame[row] ?? 0] ?? 0)
    const sd = scale * (precision[row] ?? 0)
    positions[row] = (positions[row] ?? 0) + drift + sd * random.normal()
  }
}

export interface RowInputs {
  order: FrameOrder
  emitters: EmitterPositions
  drift: DriftTrack | null
  settings: RowSettings
}

/** Fills every column; position errors use each row's own (stored) precision. */
export function fillRows(inputs: RowInputs, random: Random): Localizations {
  const { order, emitters, drift, settings } = inputs
  const { frame, rowEmitter, x, y, z } = order
  const count = frame.length
  const optics = fillOptics(count, settings, random)
  const error = { scale: 1, precision: optics.uncertainty, random }
  displace(x, { frame, by: drift?.x ?? null }, error)
  displace(y, { frame, by: drift?.y ?? null }, error)
  const table: Localizations = { count, x, y, frame, ...optics }
  if (z) {
    displace(z, { frame, by: null }, { ...error, scale: settings.axialFactor })
    table.z = z
  }
  if (emitters.channel) {
    const channel = new Uint8Array(count)
    for (let row = 0; row < count; row++) channel[row] = emitters.channel[rowEmitter[row] ?? 0] ?? 0
    table.channel = channel
  }
  return table
}
