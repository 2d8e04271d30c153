/**
 * The flag registry: every flag the science library sets, with a plain caution for people reading it.
 *
 * Flags are lowercase kebab-case strings (public API, openapi/openapi.json; shared/science/README.md §10). A flag says that a value
 * is legitimate but doubtful (a calibration outside its range, a decrement below Case B, a density at
 * its limit) or why a value is `null`. Impossible inputs throw a `ScienceInputError` instead (shared/flags.ts).
 *
 * A flag is a family, optionally followed by `:<argument>` (`missing-line:sii`, `te-out-of-range:oiii`,
 * `below-min-snr:<line>`, `ratio-limit:<key>:upper|lower`). Each family has one caution text; texts that
 * quote a number read it from the science module that uses it, so the words cannot drift from the code.
 *
 * Inside the columnar kernel the fixed flags are bits of a few 32-bit words per galaxy; `ROW_FLAGS`
 * fixes the bit order (and so the order flags appear in a result). Flags with a line or ratio key
 * (`below-min-snr:<line>`, `ratio-limit:<key>:upper|lower`) are carried in their own columns and named
 * when a result is built.
 */
import { DENSITY_FIT_MAX_CM3, DENSITY_FIT_MIN_CM3 } from '../diagnostics/density.ts'
import { ASSUMED_DENSITY_CM3, TEMPERATURE_MAX_K, TEMPERATURE_MIN_K } from '../diagnostics/temperature.ts'
import { WHAN } from '../diagnostics/whan.ts'
import { calibrationLabel, METALLICITY_KEYS, type MetallicityKey } from './calibrations.ts'
import { DIAGRAMS, diagramLabel, diagramShortLabel, type BptDiagram } from './classes.ts'
import { curveName, type DemarcationKey } from './curves.ts'
import { ionLabel, lineLabel } from './lines.ts'
import { BROAD_COVERAGE_KM_PER_S, COVERAGE_KM_PER_S } from '../spectra/lines.ts'
import { ratioLabel, type LimitKind } from './ratios.ts'

export type FlagSeverity = 'caution' | 'info'

/** The caution of one flag family; `text` receives what follows the colon ('' when nothing does). */
export interface FlagFamily {
  severity: FlagSeverity
  text: (arg: string) => string
  /** what the flag's argument names (`not-covered:halpha` → a line), for families written with one */
  argument?: FlagArgument
}

/** What a family's argument names: the family's text reads it into the sentence. */
export type FlagArgument = 'line' | 'diagram' | 'curve' | 'ratio' | 'doublet' | 'ion'

/** One flag in words, for a galaxy page. */
export interface FlagCaution { flag: string; text: string; severity: FlagSeverity }

// ── numbers in words ─────────────────────────────────────────────────────────────────────────────

const SUPERSCRIPT_DIGITS = '⁰¹²³⁴⁵⁶⁷⁸⁹'

/**
 * A number as the cautions write it: thousands grouped with a space; powers of ten from 10⁴ up as 10ⁿ.
 * @example numberInWords(30000) // '30 000'
 * @example numberInWords(1e5) // '10⁵'
 * @example numberInWords(0.5) // '0.5'
 */
export function numberInWords(v: number): string {
  const exponent = Math.log10(v)
  if (v >= 1e4 && Number.isInteger(exponent)) return `10${[...String(exponent)].map((d) => SUPERSCRIPT_DIGITS[Number(d)]).join('')}`
  const [whole, fraction] = String(v).split('.')
  const grouped = whole.length > 3 ? whole.replace(/\B(?=(\d{3})+$)/g, ' ') : whole
  return fraction === undefined ? grouped : `${grouped}.${fraction}`
}

// ── what a flag's argument names ─────────────────────────────────────────────────────────────────

/** The doublet of a density flag; a bare density flag (older results) is the [S II] one. */
const doublet = (key: string): string => ionLabel(key === '' ? 'sii' : key)

/** `nii-ka03` → "Kauffmann 2003 [N II]" (the demarcation curves of shared/diagnostics/demarcation.ts). */
function curveOnDiagram(key: string): string {
  const [diagram, curve] = key.split('-')
  return `${curve === undefined ? key : curveName(curve)} ${diagram ? diagramShortLabel(diagram) : ''}`.trim()
}

const caution = (text: FlagFamily['text'], argument?: FlagArgument): FlagFamily => ({ severity: 'caution', text, ...(argument ? { argument } : {}) })
const info = (text: FlagFamily['text'], argument?: FlagArgument): FlagFamily => ({ severity: 'info', text, ...(argument ? { argument } : {}) })

// ── the families ─────────────────────────────────────────────────────────────────────────────────

const FAMILIES = {
  // dust (shared/science/README.md §1.2, §10)
  'balmer-below-intrinsic': caution(() => 'The observed Hα/Hβ is below the intrinsic ratio, so E(B−V) was set to 0 and no dust correction was applied. The quoted error is that of the unclipped estimate.'),
  'balmer-from-hgamma': info(() => 'Hα was missing, so the dust correction comes from Hγ/Hβ instead of Hα/Hβ.'),
  'no-balmer-decrement': caution(() => 'No usable Balmer line pair, so E(B−V) is unknown and fluxes are not dereddened.'),
  // diagrams (§2.2–2.5, §9)
  'curve-crossing-region': info(() => `The point lies where the ${curveName('ka03')} curve runs above ${curveName('ke01')} (far left of the ${diagramLabel('nii')}); it was called star-forming by convention.`),
  'beyond-asymptote': info((a) => `The point lies at or right of the asymptote of the ${curveOnDiagram(a)} curve, which puts it on the AGN side of that curve whatever its [O III]/Hβ.`, 'curve'),
  'missing-line': info((a) => `Not on the ${diagramLabel(a)}: one of its lines was not measured.`, 'diagram'),
  'limit-not-decisive': caution((a) => a === 'nii-subtype'
    ? 'A limit leaves open whether this AGN is Seyfert-like or LINER-like on the [N II] diagram.'
    : `On the ${diagramLabel(a)}, an upper or lower limit leaves the class open: the point could fall on either side of a line, so it is unclassified there.`, 'diagram'),
  'nonpositive-flux': caution((a) => a === 'balmer'
    ? 'A Balmer line flux is zero or negative, so no dust correction was possible.'
    : `Not on the ${diagramLabel(a)}: a line flux is zero or negative, so its ratio has no logarithm.`, 'diagram'),
  'whan-needs-ew-halpha': info(() => 'Not on the WHAN diagram: it needs the Hα equivalent width, which was not given.'),
  'whan-passive-needs-ew-nii': info(() => `EW(Hα) is below ${numberInWords(WHAN.passiveMaxEw)} Å but there is no [N II] equivalent width, so passive could not be told from retired; reported as retired.`),
  'overall-needs-nii': caution(() => 'No overall class: the [N II] diagram is required and could not be placed.'),
  'overall-without-sii': info(() => 'The overall class uses the [N II] and [O I] diagrams only: [S II] was not available.'),
  'overall-without-oi': info(() => 'The overall class uses the [N II] and [S II] diagrams only: [O I] was not available.'),
  'overall-from-nii-only': caution(() => `The overall class rests on the [N II] diagram alone (neither [S II] nor [O I] available); AGN were split into Seyfert and LINER by the ${curveName('s07')} line.`),
  // limits (§9)
  'below-min-snr': caution((a) => `${lineLabel(a)} is below the project's minimum signal-to-noise, so it is treated as an upper limit (S/N threshold × error).`, 'line'),
  'ratio-limit': info((a) => {
    const [key, kind] = a.split(':')
    return `${ratioLabel(key)} is ${kind === 'lower' ? 'a lower limit' : 'an upper limit'}, because one of its lines is not detected.`
  }, 'ratio'),
  // metallicity, SFR (§5, §6)
  'metallicity-not-star-forming': info(() => 'No metallicity: the strong-line calibrations hold only for star-forming nuclei, and this one is not classed star-forming.'),
  'sfr-not-star-forming': caution(() => 'The Hα star-formation rate assumes all Hα comes from young stars. This nucleus is not classed star-forming, so treat the rate as an upper bound at most.'),
  'sfr-not-dereddened': caution(() => 'The star-formation rate uses the observed Hα (no E(B−V) was available), so it is likely underestimated.'),
  'sfr-needs-halpha': info(() => 'No star-formation rate: Hα is not detected.'),
  'luminosity-needs-redshift': info(() => 'No luminosity or star-formation rate: the redshift is missing or not positive.'),
  // density (§3)
  'low-density-limit': caution((a) => `The ${doublet(a)} doublet ratio is at its low-density limit: the electron density is only known to be low (below about ${numberInWords(DENSITY_FIT_MIN_CM3)} cm⁻³ in the fit), so no value is given.`, 'doublet'),
  'high-density-limit': caution((a) => `The ${doublet(a)} doublet ratio is at its high-density limit: the density is only known to be very high (above about ${numberInWords(DENSITY_FIT_MAX_CM3)} cm⁻³), so no value is given.`, 'doublet'),
  'density-needs-lines': info((a) => `No ${doublet(a)} density: both lines of the doublet must be detected.`, 'doublet'),
  // temperature (§4)
  'te-out-of-range': caution((a) => `The ${ionLabel(a)} auroral-line ratio has no temperature solution between ${numberInWords(TEMPERATURE_MIN_K)} and ${numberInWords(TEMPERATURE_MAX_K)} K.`, 'ion'),
  'te-upper-limit': info((a) => `The ${ionLabel(a)} auroral line is not detected, so the temperature is only an upper limit and no value is given.`, 'ion'),
  'te-density-assumed': info((a) => `The ${ionLabel(a)} temperature was solved with an assumed density of ${numberInWords(ASSUMED_DENSITY_CM3)} cm⁻³, because no [S II] density was available.`, 'ion'),
  'te-from-fixed-doublet-ratio': info((a) => `The weaker ${ionLabel(a)} nebular line was missing and was taken from the fixed theoretical ratio to the stronger one.`, 'ion'),
  'te-needs-lines': info((a) => `No ${ionLabel(a)} temperature: the auroral and nebular lines are needed.`, 'ion'),
  // black hole (§7)
  'black-hole-needs-fwhm': info(() => 'No black-hole mass: the broad Hα line width (FWHM) was not given.'),
  'black-hole-needs-redshift': info(() => 'No black-hole mass: it needs a redshift for the luminosity.'),
  'black-hole-broad-halpha-limit': info(() => 'Broad Hα is only an upper limit, so no black-hole mass is given.'),
} as const satisfies Record<string, FlagFamily>

/** What a family's argument names, or undefined for a family written without one. */
export function flagArgument(family: string): FlagArgument | undefined {
  return (FLAG_FAMILIES as Readonly<Record<string, FlagFamily>>)[family]?.argument
}

/** Flags of line fits of 1-D spectra (shared/spectra/; shared/science/README.md §13, §14). */
const SPECTRUM_FAMILIES = {
  'not-covered': info((a) => a === 'nad'
    ? `Na I D is not measured: good pixels do not span ±${numberInWords(COVERAGE_KM_PER_S)} km/s around both D lines.`
    : `${lineLabel(a)} is not measured: good pixels do not span ±${numberInWords(a === 'halpha_broad' ? BROAD_COVERAGE_KM_PER_S : COVERAGE_KM_PER_S)} km/s around its expected place.`, 'line'),
  'unresolved': info((a) => `${lineLabel(a)} is not wider than the instrument: its intrinsic σ is reported as 0.`, 'line'),
  'no-instrumental-correction': caution(() => 'No instrumental resolution was given, so the line widths include the instrument\'s own broadening.'),
  'blended': caution((a) => `${lineLabel(a)} emission lies inside the Na I D absorption; both were fitted together, but their equivalent widths depend on each other.`, 'line'),
  'fit-not-converged': caution(() => 'The line fit stopped before it converged; its numbers and errors are doubtful.'),
  'fit-failed': caution(() => 'The stored spectrum could not be fitted, so it has no measurements and the galaxy\'s lines were left as they were.'),
  'doublet-ratio-linear': info(() => 'The Na I D doublet ratio is at its optically thin value: the column density uses the linear part of the curve of growth, and the Doppler parameter b is not constrained.'),
  'doublet-ratio-saturated': caution(() => 'The Na I D lines are saturated (doublet ratio near 1): only a lower limit on the column density follows, so none is given.'),
  'doublet-ratio-undefined': caution(() => 'The Na I D doublet ratio is outside the range the curve of growth allows (noise, or the stellar part), so no column density is given.'),
  'stellar-absorption-not-separated': caution(() => 'Na I D includes stellar (photospheric) absorption as well as the gas; without a stellar-population model the two are not separated, so the equivalent width and column density are upper bounds for the gas.'),
  'flux-unit-assumed': caution(() => 'The spectrum file gave no flux unit (no BUNIT keyword or unit column) and the upload set none, so 1 erg s⁻¹ cm⁻² Å⁻¹ was assumed: fluxes, luminosities and star-formation rates scale with it; ratios, classes and densities do not.'),
  'balmer-absorption-corrected': info(() => 'A fixed stellar absorption equivalent width was added back to the Balmer lines (a setting of the fit); the dust correction rests on it.'),
} as const satisfies Record<string, FlagFamily>

/** Metallicity flags carry the calibration key in front: `n2Pp04-out-of-range`. */
const metallicityOutOfRange = (key: string): FlagFamily => caution(() => `The ${calibrationLabel(key)} calibration was used outside the index range it was built for, so no value is given.`)
const metallicityNeedsDetections = (key: string): FlagFamily => info(() => `No ${calibrationLabel(key)} metallicity: its lines must be detected, not limits.`)
type MetallicityFamily = `${MetallicityKey}-out-of-range` | `${MetallicityKey}-needs-detections`
const METALLICITY_FAMILIES = Object.fromEntries(METALLICITY_KEYS.flatMap((k) => [
  [`${k}-out-of-range`, metallicityOutOfRange(k)], [`${k}-needs-detections`, metallicityNeedsDetections(k)],
])) as Record<MetallicityFamily, FlagFamily>

/** Every flag family, by name. */
export const FLAG_FAMILIES: Readonly<Record<FlagFamilyName, FlagFamily>> = { ...FAMILIES, ...METALLICITY_FAMILIES, ...SPECTRUM_FAMILIES }
export type FlagFamilyName = keyof typeof FAMILIES | MetallicityFamily | keyof typeof SPECTRUM_FAMILIES

/** The families only a spectrum fit sets (the rest come from the diagnostics kernel). */
export const SPECTRUM_FLAG_FAMILIES = Object.keys(SPECTRUM_FAMILIES) as (keyof typeof SPECTRUM_FAMILIES)[]

/** A flag name: the family, and its argument after a colon. */
export function flagName(family: FlagFamilyName, arg?: string): string {
  return arg === undefined ? family : `${family}:${arg}`
}

/** Flag of a galaxy line that was turned into an upper limit (shared/science/README.md §9). */
export const belowMinSnrFlag = (line: string): string => flagName('below-min-snr', line)

/** Flag of a ratio that is a limit: `ratio-limit:<key>:upper|lower` (public API `ratios`; shared/science/README.md §9). */
export const ratioLimitFlag = (key: string, kind: LimitKind): string => flagName('ratio-limit', `${key}:${kind}`)

/** Flags a density block names in its own `flag` field (result `density.<doublet>.flag`). */
export const DENSITY_LIMIT_FLAGS = ['low-density-limit', 'high-density-limit'] as const satisfies readonly FlagFamilyName[]

// ── the kernel's bits ────────────────────────────────────────────────────────────────────────────

const perDiagram = (family: FlagFamilyName) => DIAGRAMS.map((d) => flagName(family, d))
const perIon = (ion: string, families: readonly FlagFamilyName[]) => families.map((f) => flagName(f, ion))
const DENSITY_FAMILIES = ['low-density-limit', 'high-density-limit', 'density-needs-lines'] as const
const TEMPERATURE_FAMILIES = ['te-out-of-range', 'te-upper-limit', 'te-density-assumed', 'te-from-fixed-doublet-ratio', 'te-needs-lines'] as const

/**
 * Every fixed flag, in bit order (bit i lives in word ⌊i/32⌋). Appending is safe; reordering changes
 * the meaning of kernel words (never stored: the kernel output is turned into strings) and the order
 * flags appear in a result.
 */
export const ROW_FLAGS: readonly string[] = [
  // dust (shared/science/README.md §1.2, §10)
  flagName('balmer-below-intrinsic'),
  flagName('balmer-from-hgamma'),
  flagName('no-balmer-decrement'),
  // diagrams (§2.2–2.4, §9)
  flagName('curve-crossing-region'),
  ...(['nii-ka03', 'nii-ke01', 'sii-ke01', 'oi-ke01'] as const satisfies readonly `${BptDiagram}-${DemarcationKey}`[]).map((c) => flagName('beyond-asymptote', c)),
  ...perDiagram('missing-line'),
  ...perDiagram('limit-not-decisive'),
  ...perDiagram('nonpositive-flux'),
  flagName('whan-needs-ew-halpha'),
  flagName('whan-passive-needs-ew-nii'),
  flagName('overall-needs-nii'),
  flagName('overall-without-sii'),
  flagName('overall-without-oi'),
  flagName('overall-from-nii-only'),
  flagName('limit-not-decisive', 'nii-subtype'),
  // metallicity, SFR (§5, §6)
  flagName('metallicity-not-star-forming'),
  flagName('sfr-not-star-forming'),
  flagName('sfr-not-dereddened'),
  flagName('sfr-needs-halpha'),
  flagName('luminosity-needs-redshift'),
  // density (§3)
  ...perIon('sii', DENSITY_FAMILIES),
  ...perIon('oii', DENSITY_FAMILIES),
  // temperature (§4)
  ...perIon('oiii', TEMPERATURE_FAMILIES),
  ...perIon('nii', TEMPERATURE_FAMILIES),
  ...METALLICITY_KEYS.map((k) => flagName(`${k}-out-of-range`)),
  ...METALLICITY_KEYS.map((k) => flagName(`${k}-needs-detections`)),
  // black hole (§7)
  flagName('black-hole-needs-fwhm'),
  flagName('black-hole-needs-redshift'),
  flagName('black-hole-broad-halpha-limit'),
  // kernel bookkeeping
  flagName('nonpositive-flux', 'balmer'),
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

// ── flags in words ───────────────────────────────────────────────────────────────────────────────

const familyOf = (name: string): FlagFamily | undefined =>
  Object.prototype.hasOwnProperty.call(FLAG_FAMILIES, name) ? FLAG_FAMILIES[name as FlagFamilyName] : undefined

function words(s: string): string {
  return s.replace(/[-_:]+/g, ' ').replace(/\s+/g, ' ').trim()
}

/**
 * A flag in plain words, with its severity. Unknown flags are still shown, in words, so a newer
 * server never hides a warning from an older page.
 * @example describeFlag('te-out-of-range:oiii').severity // 'caution'
 */
export function describeFlag(flag: string): FlagCaution {
  const colon = flag.indexOf(':')
  const head = colon < 0 ? flag : flag.slice(0, colon)
  const family = familyOf(flag) ?? familyOf(head)
  if (family) {
    const arg = familyOf(flag) ? '' : flag.slice(colon + 1)
    return { flag, text: family.text(arg).replace(/\s{2,}/g, ' '), severity: family.severity }
  }
  // calibration keys this page does not know yet still read as a calibration
  const outOfRange = /^(.+)-out-of-range$/.exec(flag)
  if (outOfRange) return { flag, ...cautionOf(metallicityOutOfRange(outOfRange[1])) }
  const needsDetections = /^(.+)-needs-detections$/.exec(flag)
  if (needsDetections) return { flag, ...cautionOf(metallicityNeedsDetections(needsDetections[1])) }
  return { flag, text: `Note from the analysis: ${words(flag)}.`, severity: 'info' }
}

function cautionOf(f: FlagFamily): Omit<FlagCaution, 'flag'> {
  return { text: f.text(''), severity: f.severity }
}

/** Every distinct flag of a list in words, in order. */
export function describeFlags(flags: readonly string[] | null | undefined): FlagCaution[] {
  return [...new Set(flags ?? [])].map(describeFlag)
}
