/**
 * Emission lines of the public API: identifier, label in astronomers' notation and rest wavelength in air.
 *
 * Source of the wavelengths: NIST Atomic Spectra Database values as commonly tabulated, quoted in
 * the team's science reference (shared/science/README.md §0; last digit from memory, shared/science/README.md §12 against NIST).
 * Air wavelengths are used for every k(λ) evaluation (project convention, shared/science/README.md §0): the
 * extinction laws are parameterised in 1/λ and the air/vacuum difference changes k by ≤ 0.0014.
 */

const NIST = 'NIST ASD (air); shared/science/README.md §0'

/**
 * Every line of the public API in a fixed order; the index of a line in this array is its column in the
 * columnar kernel (`LINE_INDEX`). `halpha_broad` is the broad component of Hα (same wavelength).
 * Append only: the identifiers are the API's and the stored records' keys.
 *
 * `ucd`: the IVOA UCD1+ word of the line (the exports' UCDs): the Balmer lines and [O III] have words
 * of their own, the others the generic `em.line` (IVOA UCD1+ controlled vocabulary; from memory,
 * shared/science/README.md §12).
 */
export const LINES = [
  { id: 'halpha', label: 'Hα 6563', airAngstrom: 6562.8, ucd: 'em.line.Halpha', source: NIST },
  { id: 'hbeta', label: 'Hβ 4861', airAngstrom: 4861.33, ucd: 'em.line.Hbeta', source: NIST },
  { id: 'hgamma', label: 'Hγ 4340', airAngstrom: 4340.47, ucd: 'em.line.Hgamma', source: NIST },
  { id: 'hdelta', label: 'Hδ 4102', airAngstrom: 4101.74, ucd: 'em.line.Hdelta', source: NIST },
  { id: 'oiii_5007', label: '[O III] 5007', airAngstrom: 5006.84, ucd: 'em.line.OIII', source: NIST },
  { id: 'oiii_4959', label: '[O III] 4959', airAngstrom: 4958.91, ucd: 'em.line.OIII', source: NIST },
  { id: 'oiii_4363', label: '[O III] 4363', airAngstrom: 4363.21, ucd: 'em.line.OIII', source: NIST },
  { id: 'nii_6584', label: '[N II] 6584', airAngstrom: 6583.45, ucd: 'em.line', source: NIST },
  { id: 'nii_6548', label: '[N II] 6548', airAngstrom: 6548.05, ucd: 'em.line', source: NIST },
  // compilations differ by ~0.05 Å for this auroral line (shared/science/README.md §0)
  { id: 'nii_5755', label: '[N II] 5755', airAngstrom: 5754.64, ucd: 'em.line', source: NIST },
  { id: 'sii_6717', label: '[S II] 6717', airAngstrom: 6716.44, ucd: 'em.line', source: NIST },
  { id: 'sii_6731', label: '[S II] 6731', airAngstrom: 6730.82, ucd: 'em.line', source: NIST },
  { id: 'oi_6300', label: '[O I] 6300', airAngstrom: 6300.3, ucd: 'em.line', source: NIST },
  { id: 'oii_3726', label: '[O II] 3726', airAngstrom: 3726.03, ucd: 'em.line', source: NIST },
  { id: 'oii_3729', label: '[O II] 3729', airAngstrom: 3728.82, ucd: 'em.line', source: NIST },
  { id: 'halpha_broad', label: 'Hα broad', airAngstrom: 6562.8, ucd: 'em.line.Halpha', source: NIST },
] as const satisfies readonly { id: string; label: string; airAngstrom: number; ucd: string; source: string }[]

/** The 16 line identifiers of the public API (openapi/openapi.json). */
export type LineId = (typeof LINES)[number]['id']

/** A line identifier with its label, air rest wavelength (Å) and where that number comes from. */
export interface LineInfo {
  id: LineId
  /** label in astronomers' notation, e.g. "[O III] 5007" */
  label: string
  /** rest wavelength in air, Å */
  airAngstrom: number
  /** IVOA UCD1+ word of the line */
  ucd: string
  source: string
}

/** The line identifiers in kernel column order. */
export const LINE_IDS: readonly LineId[] = LINES.map((l) => l.id)

/** Number of lines (16). */
export const LINE_COUNT = LINES.length

/** Column index of every line in the columnar kernel. */
export const LINE_INDEX: Readonly<Record<LineId, number>> = Object.fromEntries(
  LINES.map((l, i) => [l.id, i]),
) as Record<LineId, number>

/** Air rest wavelength (Å) of every line, by identifier. */
export const AIR_WAVELENGTH_ANGSTROM: Readonly<Record<LineId, number>> = Object.fromEntries(
  LINES.map((l) => [l.id, l.airAngstrom]),
) as Record<LineId, number>

/**
 * Lines that only a fit of a spectrum reports, never a flux table: He I 5876, fitted beside the
 * Na I D absorption it sits in (shared/science/README.md §14). Not kernel columns.
 */
export const FIT_ONLY_LINES = [
  // NIST multiplet as usually quoted (from memory, shared/science/README.md §12)
  { id: 'hei_5876', label: 'He I 5876', airAngstrom: 5875.62, source: NIST },
] as const satisfies readonly { id: string; label: string; airAngstrom: number; source: string }[]

const LINE_LABELS: Readonly<Record<string, string>> = Object.fromEntries([...LINES, ...FIT_ONLY_LINES].map((l) => [l.id, l.label]))
const LINE_UCDS: Readonly<Record<string, string>> = Object.fromEntries(LINES.map((l) => [l.id, l.ucd]))

/**
 * True when `id` is one of the 16 line identifiers.
 * @example isLineId('toString') // false
 */
export function isLineId(id: string): id is LineId {
  return Object.prototype.hasOwnProperty.call(LINE_INDEX, id)
}

/**
 * Label of a line identifier; an unknown identifier is shown as it is.
 * @example lineLabel('oiii_5007') // '[O III] 5007'
 */
export function lineLabel(id: string): string {
  return Object.prototype.hasOwnProperty.call(LINE_LABELS, id) ? LINE_LABELS[id]! : id
}

/**
 * IVOA UCD1+ word of a line, for the UCDs of the quantities measured on it.
 * @example lineUcd('oiii_4363') // 'em.line.OIII'
 * @example lineUcd('sii_6717') // 'em.line'
 */
export function lineUcd(id: LineId): string {
  return LINE_UCDS[id]
}

/** Ions whose line pairs give a density or a temperature (result `density`, `temperature`). */
export const IONS = [
  { key: 'oiii', label: '[O III]' },
  { key: 'nii', label: '[N II]' },
  { key: 'sii', label: '[S II]' },
  { key: 'oii', label: '[O II]' },
  { key: 'oi', label: '[O I]' },
] as const satisfies readonly { key: string; label: string }[]
export type Ion = (typeof IONS)[number]['key']

/** Doublets of the electron density (Sanders et al. 2016; result `density`), in result order. */
export const DENSITY_DOUBLETS = ['sii', 'oii'] as const satisfies readonly Ion[]
/** Ions of the electron temperature (Osterbrock & Ferland 2006 eqs. 5.4/5.5; result `temperature`). */
export const TEMPERATURE_IONS = ['oiii', 'nii'] as const satisfies readonly Ion[]

const ION_LABELS: Readonly<Record<string, string>> = Object.fromEntries(IONS.map((i) => [i.key, i.label]))

/**
 * Label of an ion key; an unknown key is shown as it is.
 * @example ionLabel('oiii') // '[O III]'
 */
export function ionLabel(key: string): string {
  return ION_LABELS[key] ?? key
}
