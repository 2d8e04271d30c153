/**
 * Classes of the diagnostic diagrams (public API `classes`, openapi/openapi.json): name, label, colour,
 * and the two integer codes a class has.
 *
 * - The kernel code is the class's position in `CLASSES`: the Int8 columns of the columnar kernel and
 *   the Monte Carlo class fractions use it (`CLASS_*` constants, `className`).
 * - The stored code is the class's position in its diagram's list `DIAGRAM_CLASSES[diagram]`: the
 *   database columns and the columnar diagram endpoint use it (`classCode`, `classAt`).
 * Both orders are append only; never reorder.
 *
 * Colours come from the colour-blind-safe palette of Okabe & Ito (2008, "Color Universal Design"),
 * the same hue for the same physical meaning in every diagram: star formation blue, composite green,
 * strong AGN / Seyfert vermillion, weak AGN / LINER orange, retired purple, passive yellow.
 */
import { ionLabel } from './lines.ts'

export const OKABE_ITO = {
  black: '#000000',
  orange: '#E69F00',
  skyBlue: '#56B4E9',
  bluishGreen: '#009E73',
  yellow: '#F0E442',
  blue: '#0072B2',
  vermillion: '#D55E00',
  reddishPurple: '#CC79A7',
} as const

export const UNCLASSIFIED_GREY = '#8E8E8E'
/** Text on a class chip must stay readable: dark text on the light hues, white on the others. */
const DARK_TEXT = '#1A1A1A'
const LIGHT_TEXT = '#FFFFFF'

/** Every class, in kernel-code order. */
export const CLASSES = [
  { key: 'unclassified', label: 'Unclassified', colour: UNCLASSIFIED_GREY, textColour: LIGHT_TEXT },
  { key: 'star-forming', label: 'Star-forming', colour: OKABE_ITO.blue, textColour: LIGHT_TEXT },
  { key: 'composite', label: 'Composite', colour: OKABE_ITO.bluishGreen, textColour: LIGHT_TEXT },
  { key: 'agn', label: 'AGN', colour: OKABE_ITO.vermillion, textColour: LIGHT_TEXT },
  { key: 'seyfert', label: 'Seyfert', colour: OKABE_ITO.vermillion, textColour: LIGHT_TEXT },
  { key: 'liner', label: 'LINER', colour: OKABE_ITO.orange, textColour: DARK_TEXT },
  // never on the same panel as 'retired' (overall vs WHAN)
  { key: 'ambiguous', label: 'Ambiguous', colour: OKABE_ITO.reddishPurple, textColour: LIGHT_TEXT },
  { key: 'strong-agn', label: 'Strong AGN', colour: OKABE_ITO.vermillion, textColour: LIGHT_TEXT },
  { key: 'weak-agn', label: 'Weak AGN', colour: OKABE_ITO.orange, textColour: DARK_TEXT },
  { key: 'retired', label: 'Retired', colour: OKABE_ITO.reddishPurple, textColour: LIGHT_TEXT },
  { key: 'passive', label: 'Passive', colour: OKABE_ITO.yellow, textColour: DARK_TEXT },
] as const satisfies readonly { key: string; label: string; colour: string; textColour: string }[]

export type ClassName = (typeof CLASSES)[number]['key']

/** Colour of every class, by name. */
export const CLASS_COLOURS: Readonly<Record<ClassName, string>> = Object.fromEntries(CLASSES.map((c) => [c.key, c.colour])) as Record<ClassName, string>

/** Class names in kernel-code order. */
export const CLASS_KEYS: readonly ClassName[] = CLASSES.map((c) => c.key)

/** Kernel code of every class. */
export const CLASS_CODE: Readonly<Record<ClassName, number>> = Object.fromEntries(CLASSES.map((c, i) => [c.key, i])) as Record<ClassName, number>

export const CLASS_UNCLASSIFIED = CLASS_CODE['unclassified']
export const CLASS_STAR_FORMING = CLASS_CODE['star-forming']
export const CLASS_COMPOSITE = CLASS_CODE['composite']
export const CLASS_AGN = CLASS_CODE['agn']
export const CLASS_SEYFERT = CLASS_CODE['seyfert']
export const CLASS_LINER = CLASS_CODE['liner']
export const CLASS_AMBIGUOUS = CLASS_CODE['ambiguous']
export const CLASS_STRONG_AGN = CLASS_CODE['strong-agn']
export const CLASS_WEAK_AGN = CLASS_CODE['weak-agn']
export const CLASS_RETIRED = CLASS_CODE['retired']
export const CLASS_PASSIVE = CLASS_CODE['passive']

/**
 * Name of a kernel class code.
 * @param code  CLASS_* code
 * @returns the class name of the public API
 * @example className(CLASS_SEYFERT) // 'seyfert'
 */
export function className(code: number): ClassName {
  return CLASS_KEYS[code] ?? 'unclassified'
}

/**
 * The classes each diagram can give, in stored-code order (the index is the code in the database
 * columns and the columnar diagram endpoint). `unclassified` is last in every list.
 */
export const DIAGRAM_CLASSES = {
  overall: ['star-forming', 'composite', 'seyfert', 'liner', 'ambiguous', 'unclassified'],
  nii: ['star-forming', 'composite', 'agn', 'unclassified'],
  sii: ['star-forming', 'seyfert', 'liner', 'unclassified'],
  oi: ['star-forming', 'seyfert', 'liner', 'unclassified'],
  whan: ['star-forming', 'strong-agn', 'weak-agn', 'retired', 'passive', 'unclassified'],
} as const satisfies Record<string, readonly ClassName[]>

/** The class columns of a result: the overall class and one per diagram. */
export type ClassDiagram = keyof typeof DIAGRAM_CLASSES
export const CLASS_DIAGRAMS = Object.keys(DIAGRAM_CLASSES) as ClassDiagram[]

/** The three line-ratio diagrams of Baldwin, Phillips & Terlevich 1981 type. */
export const BPT_DIAGRAMS = ['nii', 'sii', 'oi'] as const
export type BptDiagram = (typeof BPT_DIAGRAMS)[number]
/** The four diagram panels: the BPT diagrams and WHAN (Cid Fernandes et al. 2011). */
export const DIAGRAMS = [...BPT_DIAGRAMS, 'whan'] as const
export type Diagram = (typeof DIAGRAMS)[number]

/** Short name of each class column (table headings, curve names): the BPT diagrams by their ion. */
const DIAGRAM_SHORT_LABELS: Readonly<Record<ClassDiagram, string>> = {
  overall: 'Overall', nii: ionLabel('nii'), sii: ionLabel('sii'), oi: ionLabel('oi'), whan: 'WHAN',
}

/** Label of each class column: "[N II] diagram", …, and "Overall". */
export const DIAGRAM_LABELS: Readonly<Record<ClassDiagram, string>> = Object.fromEntries(CLASS_DIAGRAMS.map((d) =>
  [d, d === 'overall' ? DIAGRAM_SHORT_LABELS[d] : `${DIAGRAM_SHORT_LABELS[d]} diagram`])) as Record<ClassDiagram, string>

export type NiiClass = (typeof DIAGRAM_CLASSES.nii)[number]
export type SiiOiClass = (typeof DIAGRAM_CLASSES.sii)[number]
export type WhanClass = (typeof DIAGRAM_CLASSES.whan)[number]
export type OverallClass = (typeof DIAGRAM_CLASSES.overall)[number]

/** Subtypes of an AGN on the [N II] diagram (Schawinski et al. 2007; `classes.niiSubtype`). */
export const NII_SUBTYPES = ['seyfert', 'liner'] as const satisfies readonly ClassName[]

/**
 * Stored code of a class on a diagram; an unknown or missing name is `unclassified` (the last code).
 * @example classCode('nii', 'agn') // 2
 */
export function classCode(diagram: ClassDiagram, name: string | null | undefined): number {
  const names: readonly string[] = DIAGRAM_CLASSES[diagram]
  const i = names.indexOf(name ?? 'unclassified')
  return i < 0 ? names.length - 1 : i
}

/**
 * Class name of a stored code on a diagram; an unknown code is `unclassified`.
 * @example classAt('whan', 3) // 'retired'
 */
export function classAt(diagram: ClassDiagram, code: number): ClassName {
  return DIAGRAM_CLASSES[diagram][code] ?? 'unclassified'
}

type ClassEntry = (typeof CLASSES)[number]
const BY_NAME: Readonly<Record<string, ClassEntry>> = Object.fromEntries(CLASSES.map((c) => [c.key, c]))
const entry = (name: string | null | undefined): ClassEntry | undefined => (name ? BY_NAME[name] : undefined)

/**
 * Label of a class name: '—' when there is none, the name itself when it is unknown.
 * @example classLabel('liner') // 'LINER'
 */
export function classLabel(name: string | null | undefined): string {
  if (!name) return '—'
  return entry(name)?.label ?? name
}

/**
 * Label of a stored code on a diagram.
 * @example classLabelAt('overall', 2) // 'Seyfert'
 */
export function classLabelAt(diagram: ClassDiagram, code: number): string {
  return classLabel(classAt(diagram, code))
}

/** Colour of a class; grey for none or an unknown name. */
export function classColour(name: string | null | undefined): string {
  return entry(name)?.colour ?? UNCLASSIFIED_GREY
}

/** Text colour on a chip of the class's colour. */
export function classTextColour(name: string | null | undefined): string {
  return entry(name)?.textColour ?? LIGHT_TEXT
}

/**
 * Short name of a diagram or of the overall class.
 * @example diagramShortLabel('oi') // '[O I]'
 */
export function diagramShortLabel(key: string): string {
  return (DIAGRAM_SHORT_LABELS as Record<string, string>)[key] ?? key
}

/**
 * Label of a diagram or of the overall class.
 * @example diagramLabel('sii') // '[S II] diagram'
 */
export function diagramLabel(key: string): string {
  return (DIAGRAM_LABELS as Record<string, string>)[key] ?? `${key} diagram`
}
