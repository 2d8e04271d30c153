/**
 * Class codes shared by the classifiers and the columnar kernel (Int8 columns), and their API names
 * (public API `classes`, openapi/openapi.json).
 */
export const CLASS_UNCLASSIFIED = 0
export const CLASS_STAR_FORMING = 1
export const CLASS_COMPOSITE = 2
export const CLASS_AGN = 3
export const CLASS_SEYFERT = 4
export const CLASS_LINER = 5
export const CLASS_AMBIGUOUS = 6
export const CLASS_STRONG_AGN = 7
export const CLASS_WEAK_AGN = 8
export const CLASS_RETIRED = 9
export const CLASS_PASSIVE = 10

/** API name of every class code, indexed by code. */
export const CLASS_NAMES = [
  'unclassified', 'star-forming', 'composite', 'agn', 'seyfert', 'liner', 'ambiguous',
  'strong-agn', 'weak-agn', 'retired', 'passive',
] as const

export type ClassName = (typeof CLASS_NAMES)[number]
export type NiiClass = 'star-forming' | 'composite' | 'agn' | 'unclassified'
export type SiiOiClass = 'star-forming' | 'seyfert' | 'liner' | 'unclassified'
export type WhanClass = 'star-forming' | 'strong-agn' | 'weak-agn' | 'retired' | 'passive' | 'unclassified'
export type OverallClass = 'star-forming' | 'composite' | 'seyfert' | 'liner' | 'ambiguous' | 'unclassified'

/** The classes each diagram can take, in a fixed order (for class probabilities). */
export const DIAGRAM_CLASSES = {
  nii: ['star-forming', 'composite', 'agn', 'unclassified'],
  sii: ['star-forming', 'seyfert', 'liner', 'unclassified'],
  oi: ['star-forming', 'seyfert', 'liner', 'unclassified'],
  whan: ['star-forming', 'strong-agn', 'weak-agn', 'retired', 'passive', 'unclassified'],
  overall: ['star-forming', 'composite', 'seyfert', 'liner', 'ambiguous', 'unclassified'],
} as const

/**
 * API name of a class code.
 * @param code  CLASS_* code
 * @returns the contract's class name
 * @example className(CLASS_SEYFERT) // 'seyfert'
 */
export function className(code: number): ClassName {
  return CLASS_NAMES[code] ?? 'unclassified'
}
