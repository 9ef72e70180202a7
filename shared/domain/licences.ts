import spdxIds from 'spdx-license-ids'

/** Every SPDX licence identifier, from the maintained list package (case as SPDX writes it). */
export const SPDX_LICENCE_IDS: readonly string[] = spdxIds

/** The open licences a data deposit usually takes (DOMAIN.md 3.5), offered first in forms. */
export const COMMON_DATA_LICENCES = [
  'CC0-1.0',
  'CC-BY-4.0',
  'CC-BY-SA-4.0',
  'CC-BY-NC-4.0',
  'ODbL-1.0',
  'ODC-By-1.0',
  'PDDL-1.0',
] as const

export const DEFAULT_LICENCE = 'CC-BY-4.0'

const known = new Set(SPDX_LICENCE_IDS)
export const isSpdxLicenceId = (id: string): boolean => known.has(id)
