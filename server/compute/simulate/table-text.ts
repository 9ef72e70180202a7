import type { Localizations } from '../localizations.types'

/** Column headers a localization table writer would use, units in brackets. */
const COLUMNS: [keyof Omit<Localizations, 'count'>, string, number][] = [
  ['frame', 'frame', 0],
  ['x', 'x [nm]', 2],
  ['y', 'y [nm]', 2],
  ['z', 'z [nm]', 1],
  ['photons', 'photons', 1],
  ['background', 'background [photons]', 2],
  ['sigma', 'sigma [nm]', 1],
  ['uncertainty', 'uncertainty [nm]', 2],
  ['channel', 'channel', 0],
]

/**
 * A simulated table as the comma-separated text a lab would deposit: a header with units, one row
 * per localization, frames counted from 1 (as most fitting software writes them).
 */
export function localizationsToCsv(locs: Localizations): string {
  const present = COLUMNS.filter(([key]) => locs[key] !== undefined)
  const lines = [present.map(([, header]) => header).join(',')]
  for (let i = 0; i < locs.count; i++) {
    lines.push(
      present
        .map(([key, , digits]) => {
          const value = (locs[key] as ArrayLike<number>)[i]!
          return key === 'frame' ? String(value + 1) : value.toFixed(digits)
        })
        .join(','),
    )
  }
  return `${lines.join('\n')}\n`
}
