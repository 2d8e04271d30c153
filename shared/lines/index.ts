/**
 * Emission-line identifiers of the public API and their rest wavelengths in air.
 *
 * Source of the wavelengths: NIST Atomic Spectra Database values as commonly tabulated, quoted in
 * the team's science reference (shared/science/README.md §0; last digit from memory, shared/science/README.md §12 against NIST).
 * Air wavelengths are used for every k(λ) evaluation (project convention, shared/science/README.md §0): the
 * extinction laws are parameterised in 1/λ and the air/vacuum difference changes k by ≤ 0.0014.
 */

/** The 16 line identifiers of the public API (openapi/openapi.json). */
export type LineId =
  | 'halpha' | 'hbeta' | 'hgamma' | 'hdelta'
  | 'oiii_5007' | 'oiii_4959' | 'oiii_4363'
  | 'nii_6584' | 'nii_6548' | 'nii_5755'
  | 'sii_6717' | 'sii_6731' | 'oi_6300'
  | 'oii_3726' | 'oii_3729' | 'halpha_broad'

/** A line identifier with its air rest wavelength and where that number comes from. */
export interface LineInfo {
  id: LineId
  /** human label, e.g. "[O III] 5007" */
  label: string
  /** rest wavelength in air, Å */
  airAngstrom: number
  source: string
}

const NIST = 'NIST ASD (air); shared/science/README.md §0'

/**
 * Every contract line in a fixed order; the index of a line in this array is its column in the
 * columnar kernel (`LINE_INDEX`). `halpha_broad` is the broad component of Hα (same wavelength).
 */
export const LINES: readonly LineInfo[] = [
  { id: 'halpha', label: 'Hα', airAngstrom: 6562.8, source: NIST },
  { id: 'hbeta', label: 'Hβ', airAngstrom: 4861.33, source: NIST },
  { id: 'hgamma', label: 'Hγ', airAngstrom: 4340.47, source: NIST },
  { id: 'hdelta', label: 'Hδ', airAngstrom: 4101.74, source: NIST },
  { id: 'oiii_5007', label: '[O III] 5007', airAngstrom: 5006.84, source: NIST },
  { id: 'oiii_4959', label: '[O III] 4959', airAngstrom: 4958.91, source: NIST },
  { id: 'oiii_4363', label: '[O III] 4363', airAngstrom: 4363.21, source: NIST },
  { id: 'nii_6584', label: '[N II] 6584', airAngstrom: 6583.45, source: NIST },
  { id: 'nii_6548', label: '[N II] 6548', airAngstrom: 6548.05, source: NIST },
  // compilations differ by ~0.05 Å for this auroral line (shared/science/README.md §0)
  { id: 'nii_5755', label: '[N II] 5755', airAngstrom: 5754.64, source: NIST },
  { id: 'sii_6717', label: '[S II] 6717', airAngstrom: 6716.44, source: NIST },
  { id: 'sii_6731', label: '[S II] 6731', airAngstrom: 6730.82, source: NIST },
  { id: 'oi_6300', label: '[O I] 6300', airAngstrom: 6300.3, source: NIST },
  { id: 'oii_3726', label: '[O II] 3726', airAngstrom: 3726.03, source: NIST },
  { id: 'oii_3729', label: '[O II] 3729', airAngstrom: 3728.82, source: NIST },
  { id: 'halpha_broad', label: 'Hα (broad)', airAngstrom: 6562.8, source: NIST },
] as const

/** The contract identifiers in kernel column order. */
export const LINE_IDS: readonly LineId[] = LINES.map((l) => l.id)

/** Number of contract lines (16). */
export const LINE_COUNT = LINES.length

/** Column index of every line in the columnar kernel. */
export const LINE_INDEX: Readonly<Record<LineId, number>> = Object.fromEntries(
  LINES.map((l, i) => [l.id, i]),
) as Record<LineId, number>

/** Air rest wavelength (Å) of every line, by identifier. */
export const AIR_WAVELENGTH_ANGSTROM: Readonly<Record<LineId, number>> = Object.fromEntries(
  LINES.map((l) => [l.id, l.airAngstrom]),
) as Record<LineId, number>

/** True when `id` is one of the 16 contract identifiers. */
export function isLineId(id: string): id is LineId {
  return Object.prototype.hasOwnProperty.call(LINE_INDEX, id)
}
