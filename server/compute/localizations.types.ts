/**
 * Localizations as the compute engines take them: one typed array per column, all of one length,
 * positions and widths in nm, frames as 0-based indices. Engines never see Arrow, files or the
 * database; the localization store's reader produces this shape.
 */
export type NumericColumn = Float64Array | Float32Array | Uint32Array | Uint16Array | Uint8Array

export interface Localizations {
  count: number
  /** Sample coordinates, nm. */
  x: NumericColumn
  y: NumericColumn
  /** 0-based frame index. */
  frame: NumericColumn
  /** Axial position, nm (3D tables). */
  z?: NumericColumn
  /** Detected photons (photoelectrons) in the spot. */
  photons?: NumericColumn
  /** Background level, photons per pixel. */
  background?: NumericColumn
  /** Fitted PSF standard deviation, nm. */
  sigma?: NumericColumn
  /** Lateral localization precision (one standard deviation), nm. */
  uncertainty?: NumericColumn
  /** Channel number (0, 1, …) of multi-colour tables. */
  channel?: NumericColumn
}
