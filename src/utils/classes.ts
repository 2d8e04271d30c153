/**
 * Class colours from the colour-blind-safe palette of Okabe & Ito (2008, "Color Universal Design"),
 * the same hue for the same physical meaning in every diagram: star formation blue, composite green,
 * strong AGN / Seyfert vermillion, weak AGN / LINER orange, retired purple, passive yellow.
 */
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

const UNCLASSIFIED_GREY = '#8E8E8E'

export const CLASS_COLOURS: Record<string, string> = {
  'star-forming': OKABE_ITO.blue,
  composite: OKABE_ITO.bluishGreen,
  agn: OKABE_ITO.vermillion,
  seyfert: OKABE_ITO.vermillion,
  'strong-agn': OKABE_ITO.vermillion,
  liner: OKABE_ITO.orange,
  'weak-agn': OKABE_ITO.orange,
  retired: OKABE_ITO.reddishPurple,
  passive: OKABE_ITO.yellow,
  ambiguous: OKABE_ITO.reddishPurple, // never on the same panel as 'retired' (overall vs WHAN)
  unclassified: UNCLASSIFIED_GREY,
}

export const CLASS_LABELS: Record<string, string> = {
  'star-forming': 'Star-forming',
  composite: 'Composite',
  agn: 'AGN',
  seyfert: 'Seyfert',
  liner: 'LINER',
  'strong-agn': 'Strong AGN',
  'weak-agn': 'Weak AGN',
  retired: 'Retired',
  passive: 'Passive',
  ambiguous: 'Ambiguous',
  unclassified: 'Unclassified',
}

export function classColour(name: string | null | undefined): string {
  return (name && CLASS_COLOURS[name]) || UNCLASSIFIED_GREY
}

export function classLabel(name: string | null | undefined): string {
  if (!name) return '—'
  return CLASS_LABELS[name] ?? name
}

/** The classes each diagram can give (public API, openapi/openapi.json), for filters and legends. */
export const CLASSES_BY_DIAGRAM = {
  overall: ['star-forming', 'composite', 'seyfert', 'liner', 'ambiguous', 'unclassified'],
  nii: ['star-forming', 'composite', 'agn', 'unclassified'],
  sii: ['star-forming', 'seyfert', 'liner', 'unclassified'],
  oi: ['star-forming', 'seyfert', 'liner', 'unclassified'],
  whan: ['star-forming', 'strong-agn', 'weak-agn', 'retired', 'passive', 'unclassified'],
} as const

export const DIAGRAM_LABELS = {
  overall: 'Overall',
  nii: '[N II] diagram',
  sii: '[S II] diagram',
  oi: '[O I] diagram',
  whan: 'WHAN diagram',
} as const

/** Text on a class chip must stay readable: dark text on the light hues. */
export function classTextColour(name: string | null | undefined): string {
  return name === 'passive' || name === 'liner' || name === 'weak-agn' ? '#1A1A1A' : '#FFFFFF'
}
