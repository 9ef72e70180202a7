/** Stage drift per frame, nm: from a function of the frame or from linear + sinusoid parameters. */
import type { DriftParameters, DriftPoint } from './options'

export interface DriftTrack {
  x: Float64Array
  y: Float64Array
}

/** Linear from 0 at frame 0 to `linearNm` at the last frame, plus A·sin(2π·frame/period). */
function fromParameters(
  parameters: DriftParameters,
  frames: number,
): (frame: number) => DriftPoint {
  const linear = parameters.linearNm ?? { x: 0, y: 0 }
  const amplitude = parameters.sinusoidAmplitudeNm ?? { x: 0, y: 0 }
  const period = parameters.sinusoidPeriodFrames ?? frames
  const span = Math.max(1, frames - 1)
  return (frame) => {
    const wave = Math.sin((2 * Math.PI * frame) / period)
    return {
      x: (linear.x * frame) / span + amplitude.x * wave,
      y: (linear.y * frame) / span + amplitude.y * wave,
    }
  }
}

/** The drift of every frame, or null when there is none. */
export function driftTrack(
  drift: ((frame: number) => DriftPoint) | DriftParameters | undefined,
  frames: number,
): DriftTrack | null {
  if (drift === undefined) return null
  const at = typeof drift === 'function' ? drift : fromParameters(drift, frames)
  const x = new Float64Array(frames)
  const y = new Float64Array(frames)
  for (let f = 0; f < frames; f++) {
    const point = at(f)
    x[f] = point.x
    y[f] = point.y
  }
  return { x, y }
}
