/**
 * Flag vocabulary of the science library, the typed input error and small input guards.
 *
 * Flags are lowercase kebab-case strings (public API, openapi/openapi.json; shared/science/README.md §10). A flag says that a value
 * is legitimate but doubtful (a calibration outside its range, a decrement below Case B, a density at
 * its limit) or why a value is `null`. Impossible inputs throw a `ScienceInputError` instead.
 *
 * Inside the columnar kernel the fixed flags are bits of a few 32-bit words per galaxy; `ROW_FLAGS`
 * fixes the bit order. Flags with a line or ratio key (`below-min-snr:<line>`,
 * `ratio-limit:<key>:upper|lower`) are carried in their own columns and named when a result is built.
 */

/** A value with the flags that qualify it. */
export interface Flagged<T> {
  value: T
  flags: string[]
}

/**
 * An impossible input (non-finite, negative where the physics forbids it, zero error, unknown line).
 * `path` is a JSON Pointer (RFC 6901) to the offending value relative to the object passed in,
 * e.g. `/lines/hbeta/error`; `diagnoseMany` prefixes the galaxy index (`/3/lines/hbeta/error`).
 * The API schema should have refused such input with a 422 already; the server maps this error to a
 * 422 with `errors: [{ path, message }]`.
 */
export class ScienceInputError extends Error {
  readonly path: string
  constructor(path: string, message: string) {
    super(message)
    this.name = 'ScienceInputError'
    this.path = path
  }
}

/** Throw a `ScienceInputError` unless `value` is a finite number. */
export function requireFinite(path: string, value: unknown): number {
  if (typeof value !== 'number' || !Number.isFinite(value)) {
    throw new ScienceInputError(path, `${path} must be a finite number, got ${String(value)}`)
  }
  return value
}

/** Throw a `ScienceInputError` unless `value` is a finite number > 0. */
export function requirePositiveFinite(path: string, value: unknown): number {
  const v = requireFinite(path, value)
  if (!(v > 0)) throw new ScienceInputError(path, `${path} must be greater than 0, got ${v}`)
  return v
}

/** The three diagnostic diagrams of Baldwin, Phillips & Terlevich 1981 type and WHAN. */
export type DiagramKey = 'nii' | 'sii' | 'oi'
export type ClassDiagramKey = DiagramKey | 'whan'

/** Metallicity calibration keys (shared/science/README.md §5). */
export const METALLICITY_KEYS = ['n2Pp04', 'n2Pp04Cubic', 'o3n2Pp04', 'n2M13', 'o3n2M13', 'n2s2haD16'] as const
export type MetallicityKey = (typeof METALLICITY_KEYS)[number]

const DIAGRAMS: readonly ClassDiagramKey[] = ['nii', 'sii', 'oi', 'whan']

/**
 * Every fixed flag, in bit order (bit i lives in word ⌊i/32⌋). Appending is safe; reordering changes
 * the meaning of stored kernel words (they are never stored: the kernel output is turned into strings).
 */
export const ROW_FLAGS: readonly string[] = [
  // dust (shared/science/README.md §1.2, §10)
  'balmer-below-intrinsic',
  'balmer-from-hgamma',
  'no-balmer-decrement',
  // diagrams (§2.2–2.4, §9)
  'curve-crossing-region',
  'beyond-asymptote:nii-ka03',
  'beyond-asymptote:nii-ke01',
  'beyond-asymptote:sii-ke01',
  'beyond-asymptote:oi-ke01',
  ...DIAGRAMS.map((d) => `missing-line:${d}`),
  ...DIAGRAMS.map((d) => `limit-not-decisive:${d}`),
  ...DIAGRAMS.map((d) => `nonpositive-flux:${d}`),
  'whan-needs-ew-halpha',
  'whan-passive-needs-ew-nii',
  'overall-needs-nii',
  'overall-without-sii',
  'overall-without-oi',
  'overall-from-nii-only',
  'limit-not-decisive:nii-subtype',
  // metallicity, SFR (§5, §6)
  'metallicity-not-star-forming',
  'sfr-not-star-forming',
  'sfr-not-dereddened',
  'sfr-needs-halpha',
  'luminosity-needs-redshift',
  // density (§3)
  'low-density-limit:sii',
  'high-density-limit:sii',
  'density-needs-lines:sii',
  'low-density-limit:oii',
  'high-density-limit:oii',
  'density-needs-lines:oii',
  // temperature (§4)
  'te-out-of-range:oiii',
  'te-upper-limit:oiii',
  'te-density-assumed:oiii',
  'te-from-fixed-doublet-ratio:oiii',
  'te-needs-lines:oiii',
  'te-out-of-range:nii',
  'te-upper-limit:nii',
  'te-density-assumed:nii',
  'te-from-fixed-doublet-ratio:nii',
  'te-needs-lines:nii',
  ...METALLICITY_KEYS.map((k) => `${k}-out-of-range`),
  ...METALLICITY_KEYS.map((k) => `${k}-needs-detections`),
  // black hole (§7)
  'black-hole-needs-fwhm',
  'black-hole-needs-redshift',
  'black-hole-broad-halpha-limit',
  // kernel bookkeeping
  'nonpositive-flux:balmer',
]

/** Number of 32-bit flag words per galaxy in the columnar kernel. */
export const FLAG_WORDS = Math.ceil(ROW_FLAGS.length / 32)

/** Bit number of every fixed flag. */
export const FLAG_BIT: Readonly<Record<string, number>> = Object.fromEntries(ROW_FLAGS.map((f, i) => [f, i]))

/** Bit number of a fixed flag; throws on a name that is not in `ROW_FLAGS` (a library bug). */
export function flagBit(name: string): number {
  const bit = FLAG_BIT[name]
  if (bit === undefined) throw new Error(`unknown flag ${name}`)
  return bit
}

/** Flag of a galaxy line that was turned into an upper limit (shared/science/README.md §9). */
export const belowMinSnrFlag = (line: string): string => `below-min-snr:${line}`

/** Flag of a ratio that is a limit: `ratio-limit:<key>:upper|lower` (public API `ratios`; shared/science/README.md §9). */
export const ratioLimitFlag = (key: string, kind: 'upper' | 'lower'): string => `ratio-limit:${key}:${kind}`
