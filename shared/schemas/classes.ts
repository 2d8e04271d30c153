/**
 * Class vocabularies of the public API (openapi/openapi.json), in a fixed order: the index is the integer code used by the
 * columnar diagram endpoint and the database columns. Append only; never reorder.
 */
export const CLASS_NAMES = {
  overall: ['star-forming', 'composite', 'seyfert', 'liner', 'ambiguous', 'unclassified'],
  nii: ['star-forming', 'composite', 'agn', 'unclassified'],
  sii: ['star-forming', 'seyfert', 'liner', 'unclassified'],
  oi: ['star-forming', 'seyfert', 'liner', 'unclassified'],
  whan: ['star-forming', 'strong-agn', 'weak-agn', 'retired', 'passive', 'unclassified'],
} as const

export type ClassDiagram = keyof typeof CLASS_NAMES
export const CLASS_DIAGRAMS = Object.keys(CLASS_NAMES) as ClassDiagram[]

export function classCode(diagram: ClassDiagram, name: string | null | undefined): number {
  const i = (CLASS_NAMES[diagram] as readonly string[]).indexOf(name ?? 'unclassified')
  return i < 0 ? CLASS_NAMES[diagram].length - 1 : i
}
