/**
 * The line ratios of the public API (`ratios`, `ratioErrors`, `ratioLimits`; shared/science/README.md §2.1):
 * log10 of the observed BPT ratios and the two linear density doublets. The order is the kernel's.
 * `label` is the short name (table columns), `definition` the ratio with its wavelengths as
 * shared/science/README.md §2.1 writes it (export descriptions, diagram axes).
 */
export const RATIOS = [
  { key: 'niiHa', label: 'log [N II]/Hα', definition: 'log [N II]6584/Hα', unit: 'dex' },
  { key: 'oiiiHb', label: 'log [O III]/Hβ', definition: 'log [O III]5007/Hβ', unit: 'dex' },
  { key: 'siiHa', label: 'log [S II]/Hα', definition: 'log ([S II]6717+6731)/Hα', unit: 'dex' },
  { key: 'oiHa', label: 'log [O I]/Hα', definition: 'log [O I]6300/Hα', unit: 'dex' },
  { key: 'siiDoublet', label: '[S II] 6717/6731', definition: '[S II] 6717/6731', unit: null },
  { key: 'oiiDoublet', label: '[O II] 3729/3726', definition: '[O II] 3729/3726', unit: null },
] as const satisfies readonly { key: string; label: string; definition: string; unit: 'dex' | null }[]

/** Keys of `ratios`. */
export type RatioKey = (typeof RATIOS)[number]['key']

export const RATIO_KEYS: readonly RatioKey[] = RATIOS.map((r) => r.key)

/** Whether a ratio is an upper or a lower limit (`ratioLimits`, flag `ratio-limit:<key>:upper|lower`). */
export const LIMIT_KINDS = ['upper', 'lower'] as const
export type LimitKind = (typeof LIMIT_KINDS)[number]

const RATIO_LABELS: Readonly<Record<string, string>> = Object.fromEntries(RATIOS.map((r) => [r.key, r.label]))
const RATIO_DEFINITIONS: Readonly<Record<string, string>> = Object.fromEntries(RATIOS.map((r) => [r.key, r.definition]))

/** True when `key` is one of the ratio keys. */
export function isRatioKey(key: string): key is RatioKey {
  return Object.prototype.hasOwnProperty.call(RATIO_LABELS, key)
}

/**
 * Label of a ratio key; an unknown key is shown as it is.
 * @example ratioLabel('niiHa') // 'log [N II]/Hα'
 */
export function ratioLabel(key: string): string {
  return isRatioKey(key) ? RATIO_LABELS[key] : key
}

/**
 * The ratio with its wavelengths (shared/science/README.md §2.1).
 * @example ratioDefinition('siiHa') // 'log ([S II]6717+6731)/Hα'
 */
export function ratioDefinition(key: RatioKey): string {
  return RATIO_DEFINITIONS[key]
}

/**
 * The Balmer decrements a dust correction can rest on (result `extinction.source`; shared/science/README.md §1.2):
 * Hα/Hβ, or Hγ/Hβ when Hα is missing. The kernel's `source` column holds the position + 1 (0: none).
 */
export const BALMER_DECREMENTS = [
  { key: 'halpha-hbeta', label: 'Hα/Hβ' },
  { key: 'hgamma-hbeta', label: 'Hγ/Hβ' },
] as const satisfies readonly { key: string; label: string }[]
export type BalmerDecrement = (typeof BALMER_DECREMENTS)[number]['key']
export const BALMER_DECREMENT_KEYS: readonly BalmerDecrement[] = BALMER_DECREMENTS.map((d) => d.key)

/**
 * Label of a decrement key; an unknown key is shown as it is.
 * @example balmerDecrementLabel('hgamma-hbeta') // 'Hγ/Hβ'
 */
export function balmerDecrementLabel(key: string): string {
  return BALMER_DECREMENTS.find((d) => d.key === key)?.label ?? key
}
