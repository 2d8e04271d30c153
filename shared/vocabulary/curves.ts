/**
 * The demarcation curves of the line-ratio diagrams (formulas: shared/diagnostics/demarcation.ts;
 * shared/science/README.md §2.2): key as the result's `distances` and the flags spell it, the paper
 * (`label`, plot hover text), its short form in sentences (`name`, flag cautions) and the tag written
 * on a plot beside the curve.
 */
export const DEMARCATION_CURVE_LIST = [
  { key: 'ka03', label: 'Kauffmann et al. 2003', name: 'Kauffmann 2003', tag: 'Ka03' },
  { key: 'ke01', label: 'Kewley et al. 2001', name: 'Kewley 2001', tag: 'Ke01' },
  { key: 'ke06', label: 'Kewley et al. 2006', name: 'Kewley 2006', tag: 'Ke06' },
  { key: 's07', label: 'Schawinski et al. 2007', name: 'Schawinski 2007', tag: 'S07' },
] as const satisfies readonly { key: string; label: string; name: string; tag: string }[]

export type DemarcationKey = (typeof DEMARCATION_CURVE_LIST)[number]['key']

type CurveEntry = (typeof DEMARCATION_CURVE_LIST)[number]
const BY_KEY: Readonly<Record<string, CurveEntry>> = Object.fromEntries(DEMARCATION_CURVE_LIST.map((c) => [c.key, c]))

/**
 * The paper of a curve; an unknown key is shown as it is.
 * @example curveLabel('s07') // 'Schawinski et al. 2007'
 */
export function curveLabel(key: string): string {
  return BY_KEY[key]?.label ?? key
}

/**
 * The short form of a curve's paper, for sentences.
 * @example curveName('ka03') // 'Kauffmann 2003'
 */
export function curveName(key: string): string {
  return BY_KEY[key]?.name ?? key
}

/**
 * The tag written beside a curve on a plot.
 * @example curveTag('ke01') // 'Ke01'
 */
export function curveTag(key: string): string {
  return BY_KEY[key]?.tag ?? key
}
