/**
 * The extinction laws the service offers (public API `settings.extinctionLaw`; shared/science/README.md §1.3),
 * with the R_V each is used with when none is given. The curves themselves live in shared/extinction/.
 */
export const EXTINCTION_LAW_LIST = [
  { key: 'ccm89', label: 'Cardelli, Clayton & Mathis 1989 (CCM89)', shortLabel: 'CCM89', defaultRv: 3.1 },
  { key: 'odonnell94', label: "O'Donnell 1994", shortLabel: "O'Donnell 94", defaultRv: 3.1 },
  // R′_V = 4.05 ± 0.80 of the starburst law (Calzetti et al. 2000, ApJ 533, 682, eq. 5)
  { key: 'calzetti00', label: 'Calzetti et al. 2000', shortLabel: 'Calzetti 2000', defaultRv: 4.05 },
  { key: 'fitzpatrick99', label: 'Fitzpatrick 1999', shortLabel: 'Fitzpatrick 99', defaultRv: 3.1 },
] as const satisfies readonly { key: string; label: string; shortLabel: string; defaultRv: number }[]

export type ExtinctionLaw = (typeof EXTINCTION_LAW_LIST)[number]['key']

export const EXTINCTION_LAWS: readonly ExtinctionLaw[] = EXTINCTION_LAW_LIST.map((l) => l.key)

type LawEntry = (typeof EXTINCTION_LAW_LIST)[number]
const BY_KEY: Readonly<Record<string, LawEntry>> = Object.fromEntries(EXTINCTION_LAW_LIST.map((l) => [l.key, l]))

/** True when `key` names one of the laws. */
export function isExtinctionLaw(key: string): key is ExtinctionLaw {
  return Object.prototype.hasOwnProperty.call(BY_KEY, key)
}

/**
 * The R_V a law is used with when the caller names the law but no R_V: 4.05 for Calzetti et al. 2000
 * (ApJ 533, 682, eq. 5: R′_V = 4.05 ± 0.80), 3.1 otherwise (diffuse Milky Way value; Cardelli et al.
 * 1989, ApJ 345, 245 — common practice).
 *
 * @param law  extinction law key
 * @returns R_V, dimensionless
 * @example defaultRvFor('calzetti00') // 4.05
 */
export function defaultRvFor(law: ExtinctionLaw): number {
  return BY_KEY[law]?.defaultRv ?? 3.1
}

/**
 * Full label of a law (the paper); an unknown key is shown as it is.
 * @example extinctionLawLabel('calzetti00') // 'Calzetti et al. 2000'
 */
export function extinctionLawLabel(key: string): string {
  return BY_KEY[key]?.label ?? key
}
