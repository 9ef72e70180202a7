/**
 * Words for the identifiers of enumerations (OME's CamelCase terms above all): the form shows
 * "Water dipping" and "Intensified CCD", the document and the exports keep `WaterDipping` and
 * `IntensifiedCCD`. Terms that read better as their common name are listed; the rest are split
 * into words, acronyms kept in capitals.
 */
const NAMED: Record<string, string> = {
  LightEmittingDiode: 'LED',
  GenericExcitationSource: 'Other excitation source',
  QSwitched: 'Q-switched',
  CW: 'Continuous wave',
  MetalVapor: 'Metal vapour',
  NonLinear: 'Non-linear',
  PlanApo: 'Plan apochromat',
  PlanFluor: 'Plan fluorite',
  PlanNeofluar: 'Plan Neofluar',
  Achro: 'Achromat (Achro)',
  Fl: 'Fluorite (Fl)',
  Apo: 'Apochromat',
  UV: 'UV corrected',
  PMT: 'Photomultiplier (PMT)',
  APD: 'Avalanche photodiode (APD)',
  FTIR: 'FTIR',
  EMCCD: 'EMCCD',
  EBCCD: 'EBCCD',
  CMOS: 'CMOS (incl. sCMOS)',
  FSM: 'FSM',
  LCM: 'LCM',
  SPIM: 'SPIM (light sheet)',
  Multi: 'Multi-immersion',
}

/** CamelCase split into words: runs of capitals stay together ("IntensifiedCCD" → "Intensified CCD"). */
function words(term: string): string {
  const parts = term.match(/[A-Z]+(?![a-z])|[A-Z]?[a-z]+|\d+[a-z]*/g)
  if (!parts) return term
  return parts
    .map((part, i) => (i > 0 && /^[A-Z][a-z]/.test(part) ? part.toLowerCase() : part))
    .join(' ')
}

export function termLabel(term: string): string {
  const named = NAMED[term]
  if (named) return named
  if (/^\d+x\d+$/.test(term)) return term.replace('x', ' × ')
  // Only identifiers are rewritten; values already in words ("dSTORM", "DNA-PAINT", "none (2D)") stay.
  return /^[A-Z][A-Za-z]*$/.test(term) ? words(term) : term
}
