import type { Colormap, ColourByChoice } from '@shared/schemas/preview.schema'
import type { PreviewInfo, TileOptions } from '@/api/quality'

/** What the person chose beside the viewer; turned into a tile query by `tileQueryOf`. */
export interface PreviewChoices {
  colormap: Colormap
  /** Brightness as a power of two: 0 is the dataset's own scale, 1 twice as bright. */
  brightnessStep: number
  method: 'histogram' | 'gaussian'
  colourBy: ColourByChoice
  /** Frames shown, first and last; the whole run when null. */
  frames: [number, number] | null
  /** Only localizations more precise than this, nm; all when null. */
  maxUncertaintyNm: number | null
  /** One channel only; all when null. */
  channel: number | null
}

export interface Choice<T> {
  title: string
  value: T
}

export const COLORMAP_CHOICES: Choice<Colormap>[] = [
  { title: 'Inferno', value: 'inferno' },
  { title: 'Magma', value: 'magma' },
  { title: 'Viridis', value: 'viridis' },
  { title: 'Cividis', value: 'cividis' },
  { title: 'Grayscale', value: 'grayscale' },
]

export const RENDER_CHOICES: Choice<PreviewChoices['method']>[] = [
  { title: 'Counts per pixel', value: 'histogram' },
  { title: 'Gaussian, each localization’s precision', value: 'gaussian' },
]

/** The colourings this table allows: depth needs z, time needs frames, overlay two channels. */
export function colourByChoices(info: PreviewInfo): Choice<ColourByChoice>[] {
  const choices: Choice<ColourByChoice>[] = [{ title: 'Density', value: 'density' }]
  if (info.zRangeNm) choices.push({ title: 'Depth (z)', value: 'z' })
  if (info.frames) choices.push({ title: 'Time (frame)', value: 'frame' })
  if ((info.channels?.length ?? 0) >= 2)
    choices.push({ title: 'Two channels overlaid', value: 'channels' })
  return choices
}

/** The channel select's value for "all channels" (channel numbers are never negative). */
export const ALL_CHANNELS = -1

export function channelChoices(info: PreviewInfo): Choice<number>[] {
  const channels = info.channels ?? []
  return [
    { title: 'All channels', value: ALL_CHANNELS },
    ...channels.map((c) => ({ title: `Channel ${c}`, value: c })),
  ]
}

export const BRIGHTNESS_STEPS = { min: -3, max: 3, step: 0.5 }
export const brightnessOf = (step: number) => 2 ** step
export function brightnessText(step: number): string {
  const factor = brightnessOf(step)
  return factor >= 1 ? `×${+factor.toFixed(2)}` : `×1/${+(1 / factor).toFixed(2)}`
}

export const defaultChoices = (): PreviewChoices => ({
  colormap: 'inferno',
  brightnessStep: 0,
  method: 'histogram',
  colourBy: 'density',
  frames: null,
  maxUncertaintyNm: null,
  channel: null,
})

/** The tile query of these choices; options the table cannot use or that change nothing left out. */
export function tileQueryOf(c: PreviewChoices, info: PreviewInfo): TileOptions {
  const query: TileOptions = { method: c.method, colourBy: c.colourBy }
  if (c.colourBy !== 'channels') query.colormap = c.colormap
  if (c.brightnessStep !== 0) query.brightness = brightnessOf(c.brightnessStep)
  const run = info.frames
  if (run && c.frames) {
    // The server takes whole frames; a partly included frame counts as included.
    const [first, last] = [Math.floor(c.frames[0]), Math.ceil(c.frames[1])]
    if (first > run.first) query.frameMin = first
    if (last < run.last) query.frameMax = last
  }
  if (info.hasUncertainty && c.maxUncertaintyNm !== null && c.maxUncertaintyNm > 0)
    query.maxUncertaintyNm = c.maxUncertaintyNm
  if (c.channel !== null && c.colourBy !== 'channels' && info.channels?.includes(c.channel))
    query.channel = c.channel
  return query
}
