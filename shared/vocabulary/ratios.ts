/**
 * The line ratios of the public API (`ratios`, `ratioErrors`, `ratioLimits`; shared/science/README.md §2.1):
 * log10 of the observed BPT ratios and the two linear density doublets. The order is the kernel's.
 */
export const RATIOS = [
  { key: 'niiHa', label: 'log [N II]/Hα', unit: 'dex' },
  { key: 'oiiiHb', label: 'log [O III]/Hβ', unit: 'dex' },
  { key: 'siiHa', label: 'log [S II]/Hα', unit: 'dex' },
  { key: 'oiHa', label: 'log [O I]/Hα', unit: 'dex' },
  { key: 'siiDoublet', label: '[S II] 6717/6731', unit: null },
  { key: 'oiiDoublet', label: '[O II] 3729/3726', unit: null },
] as const satisfies readonly { key: string; label: string; unit: 'dex' | null }[]

/** Keys of `ratios`. */
export type RatioKey = (typeof RATIOS)[number]['key']

export const RATIO_KEYS: readonly RatioKey[] = RATIOS.map((r) => r.key)

/** Whether a ratio is an upper or a lower limit (`ratioLimits`, flag `ratio-limit:<key>:upper|lower`). */
export const LIMIT_KINDS = ['upper', 'lower'] as const
export type LimitKind = (typeof LIMIT_KINDS)[number]

const RATIO_LABELS: Readonly<Record<string, string>> = Object.fromEntries(RATIOS.map((r) => [r.key, r.label]))

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
