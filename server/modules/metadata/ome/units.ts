/**
 * OME unit symbols (UnitsLength, UnitsTime, UnitsPower of the 2016-06 schema) and their factors
 * to the units Stipple stores. Symbols outside these tables are reported, not guessed.
 */
const LENGTH_TO_NM: Record<string, number> = {
  Ym: 1e33,
  Zm: 1e30,
  Em: 1e27,
  Pm: 1e24,
  Tm: 1e21,
  Gm: 1e18,
  Mm: 1e15,
  km: 1e12,
  hm: 1e11,
  dam: 1e10,
  m: 1e9,
  dm: 1e8,
  cm: 1e7,
  mm: 1e6,
  µm: 1e3,
  nm: 1,
  pm: 1e-3,
  fm: 1e-6,
  am: 1e-9,
  zm: 1e-12,
  ym: 1e-15,
  Å: 0.1,
  thou: 25_400,
  li: 2_116_666.666_666_7,
  in: 25_400_000,
  ft: 304_800_000,
  yd: 914_400_000,
}
const TIME_TO_MS: Record<string, number> = {
  Ys: 1e27,
  Zs: 1e24,
  Es: 1e21,
  Ps: 1e18,
  Ts: 1e15,
  Gs: 1e12,
  Ms: 1e9,
  ks: 1e6,
  hs: 1e5,
  das: 1e4,
  s: 1e3,
  ds: 100,
  cs: 10,
  ms: 1,
  µs: 1e-3,
  ns: 1e-6,
  ps: 1e-9,
  fs: 1e-12,
  as: 1e-15,
  zs: 1e-18,
  ys: 1e-21,
  min: 60_000,
  h: 3_600_000,
  d: 86_400_000,
}
const POWER_TO_MW: Record<string, number> = {
  YW: 1e27,
  ZW: 1e24,
  EW: 1e21,
  PW: 1e18,
  TW: 1e15,
  GW: 1e12,
  MW: 1e9,
  kW: 1e6,
  hW: 1e5,
  daW: 1e4,
  W: 1e3,
  dW: 100,
  cW: 10,
  mW: 1,
  µW: 1e-3,
  nW: 1e-6,
  pW: 1e-9,
  fW: 1e-12,
  aW: 1e-15,
  zW: 1e-18,
  yW: 1e-21,
}

/** The schema's defaults when no unit attribute is given (PhysicalSize: µm, wavelengths: nm, times: s, power: mW). */
export const OME_DEFAULT_UNITS = {
  physicalSize: 'µm',
  wavelength: 'nm',
  time: 's',
  power: 'mW',
} as const

export type Quantity = 'length' | 'time' | 'power'
const TABLES: Record<Quantity, Record<string, number>> = {
  length: LENGTH_TO_NM,
  time: TIME_TO_MS,
  power: POWER_TO_MW,
}
export const TARGET_UNIT: Record<Quantity, string> = { length: 'nm', time: 'ms', power: 'mW' }

/** Converts an OME value in `unit` to nm, ms or mW; null when the unit symbol is unknown. */
export function toStippleUnit(value: number, unit: string, quantity: Quantity): number | null {
  const factor = TABLES[quantity][unit.replace('μ', 'µ')]
  if (factor === undefined) return null
  // Round away binary noise such as 590.4999999 from pm → nm; keeps 12 significant digits.
  return Number((value * factor).toPrecision(12))
}
