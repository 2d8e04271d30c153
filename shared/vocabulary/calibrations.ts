/**
 * Calibrations of the public API: the six strong-line metallicity calibrations (result `metallicity`;
 * shared/science/README.md §5) and the two Hα star-formation-rate calibrations (`settings.sfrCalibration`,
 * result `sfr`; §6). The formulas live in shared/diagnostics/metallicity.ts and luminosity.ts.
 */

/** 12 + log(O/H) calibrations, in result and kernel order. `index` is the strong-line index used. */
export const METALLICITY_CALIBRATION_LIST = [
  { key: 'n2Pp04', index: 'N2', source: 'Pettini & Pagel 2004' },
  { key: 'n2Pp04Cubic', index: 'N2 cubic', source: 'Pettini & Pagel 2004' },
  { key: 'o3n2Pp04', index: 'O3N2', source: 'Pettini & Pagel 2004' },
  { key: 'n2M13', index: 'N2', source: 'Marino et al. 2013' },
  { key: 'o3n2M13', index: 'O3N2', source: 'Marino et al. 2013' },
  { key: 'n2s2haD16', index: 'N2S2Hα', source: 'Dopita et al. 2016' },
] as const satisfies readonly { key: string; index: string; source: string }[]

export type MetallicityKey = (typeof METALLICITY_CALIBRATION_LIST)[number]['key']
export const METALLICITY_KEYS: readonly MetallicityKey[] = METALLICITY_CALIBRATION_LIST.map((c) => c.key)

/**
 * The strong-line index and the paper of a metallicity calibration.
 * @example metallicityCalibration('n2M13').source // 'Marino et al. 2013'
 */
export function metallicityCalibration(key: MetallicityKey): (typeof METALLICITY_CALIBRATION_LIST)[number] {
  return METALLICITY_CALIBRATION_LIST.find((c) => c.key === key)!
}

/** Initial mass functions the SFR calibrations assume (result `sfr.imf`). */
export const IMF_LIST = [
  { key: 'salpeter', label: 'Salpeter' },
  { key: 'kroupa', label: 'Kroupa' },
] as const satisfies readonly { key: string; label: string }[]
export type Imf = (typeof IMF_LIST)[number]['key']
export const IMFS: readonly Imf[] = IMF_LIST.map((i) => i.key)

/** Hα SFR calibrations: Kennicutt 1998 (ARA&A 36, 189) and Kennicutt & Evans 2012 (ARA&A 50, 531). */
export const SFR_CALIBRATION_LIST = [
  { key: 'kennicutt98', source: 'Kennicutt 1998', imf: 'salpeter' },
  { key: 'kennicuttEvans12', source: 'Kennicutt & Evans 2012', imf: 'kroupa' },
] as const satisfies readonly { key: string; source: string; imf: Imf }[]
export type SfrCalibration = (typeof SFR_CALIBRATION_LIST)[number]['key']
export const SFR_CALIBRATIONS: readonly SfrCalibration[] = SFR_CALIBRATION_LIST.map((c) => c.key)

const IMF_LABELS: Readonly<Record<string, string>> = Object.fromEntries(IMF_LIST.map((i) => [i.key, i.label]))

const LABELS: Readonly<Record<string, string>> = Object.fromEntries([
  ...METALLICITY_CALIBRATION_LIST.map((c) => [c.key, `${c.index} (${c.source})`]),
  ...SFR_CALIBRATION_LIST.map((c) => [c.key, `${c.source} (${IMF_LABELS[c.imf]} IMF)`]),
])

/**
 * Label of a metallicity or SFR calibration key; an unknown key is shown as it is.
 * @example calibrationLabel('o3n2M13') // 'O3N2 (Marino et al. 2013)'
 * @example calibrationLabel('kennicuttEvans12') // 'Kennicutt & Evans 2012 (Kroupa IMF)'
 */
export function calibrationLabel(key: string): string {
  return LABELS[key] ?? key
}

/**
 * IMF of an SFR calibration.
 * @example imfOf('kennicutt98') // 'salpeter'
 */
export function imfOf(calibration: SfrCalibration): Imf {
  return SFR_CALIBRATION_LIST.find((c) => c.key === calibration)?.imf ?? 'salpeter'
}

/**
 * Label of an IMF key.
 * @example imfLabel('kroupa') // 'Kroupa'
 */
export function imfLabel(key: string): string {
  return IMF_LABELS[key] ?? key
}
