import type { TableReport } from '@/api/files'

const numberFmt = new Intl.NumberFormat(undefined, { maximumFractionDigits: 3 })
const micronFmt = new Intl.NumberFormat(undefined, { maximumFractionDigits: 2 })

/** A count or a measured value as the report shows it; a dash when there is none. */
export const numberText = (v: number | null | undefined) =>
  v === null || v === undefined ? '—' : numberFmt.format(v)

const DELIMITERS: Record<string, string> = {
  ',': 'comma',
  '\t': 'tab',
  ';': 'semicolon',
  '|': 'vertical bar',
  whitespace: 'spaces or tabs',
}
export const delimiterName = (d: string) => DELIMITERS[d] ?? d

const um = (nm: number) => micronFmt.format(nm / 1000)

/** The extent of the localizations in µm (the table stores nm). */
export function boundsText(b: TableReport['boundsNm']): string | null {
  if (!b) return null
  const w = b.xMax - b.xMin
  const h = b.yMax - b.yMin
  return (
    `x ${um(b.xMin)} to ${um(b.xMax)} µm, y ${um(b.yMin)} to ${um(b.yMax)} µm ` +
    `(${um(w)} × ${um(h)} µm)`
  )
}

/** The frame range; stored frames count from 0, the file may have counted from 1. */
export function framesText(f: TableReport['frames']): string | null {
  if (!f) return null
  const count = numberFmt.format(f.last - f.first + 1)
  const stored = `${numberFmt.format(f.first)} to ${numberFmt.format(f.last)}`
  if (f.sourceBase === 0) return `${stored} (a span of ${count} frames)`
  return (
    `${stored} as stored, counted from 0 (${numberFmt.format(f.first + 1)} to ` +
    `${numberFmt.format(f.last + 1)} in the file, which counts from 1; a span of ${count} frames)`
  )
}

/** The largest 1, 2 or 5 × 10ⁿ not above x: scale bars in round lengths (common practice). */
export function roundLengthBelow(x: number): number {
  const power = 10 ** Math.floor(Math.log10(x))
  const fraction = x / power
  return (fraction >= 5 ? 5 : fraction >= 2 ? 2 : 1) * power
}

export interface ScaleNote {
  /** Camera pixels per thumbnail pixel along each side. */
  reduction: number
  text: string
  /** A scale bar, when the pixel size is known: its length and its share of the image width. */
  bar: { label: string; fraction: number } | null
}

/**
 * What one pixel of the projection thumbnail stands for. The thumbnail keeps the stack's aspect
 * and is at most 512 px a side, so the reduction is the width ratio.
 */
export function scaleNote(
  stack: { width: number; height: number; frames: number },
  thumbnailWidth: number,
  pixelSizeNm: number | null,
): ScaleNote {
  const reduction = thumbnailWidth > 0 ? stack.width / thumbnailWidth : 1
  const shown =
    reduction > 1.001
      ? `reduced ${micronFmt.format(reduction)}× (one thumbnail pixel covers ` +
        `${micronFmt.format(reduction)} × ${micronFmt.format(reduction)} camera pixels)`
      : 'at full size (one thumbnail pixel is one camera pixel)'
  const base =
    `Mean over all ${numberFmt.format(stack.frames)} frames, ${shown}, contrast stretched ` +
    'between the 0.1 % and 99.9 % quantiles.'
  if (!pixelSizeNm)
    return {
      reduction,
      text: `${base} Give the pixel size in the description for a scale.`,
      bar: null,
    }
  const fieldNm = stack.width * pixelSizeNm
  const barNm = roundLengthBelow(fieldNm / 5)
  const label = barNm >= 1000 ? `${micronFmt.format(barNm / 1000)} µm` : `${barNm} nm`
  return {
    reduction,
    text: `${base} Field of view ${um(fieldNm)} × ${um(stack.height * pixelSizeNm)} µm at ${numberFmt.format(pixelSizeNm)} nm per camera pixel.`,
    bar: { label, fraction: barNm / fieldNm },
  }
}
