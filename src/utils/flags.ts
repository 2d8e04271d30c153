import { lineLabel, RATIO_LABELS } from './lines'
import { DIAGRAM_LABELS } from './classes'

/**
 * Flags are terse machine words (public API, openapi/openapi.json; shared/science/README.md §10). People reading a galaxy
 * page need to know what a flag means for the number beside it, so each gets a plain caution.
 * Unknown flags are still shown, in words, so a newer server never hides a warning from an older page.
 */
export type FlagSeverity = 'caution' | 'info'

export interface FlagCaution { flag: string; text: string; severity: FlagSeverity }

const FIXED: Record<string, [string, FlagSeverity]> = {
  'balmer-below-intrinsic': ['The observed Hα/Hβ is below the intrinsic ratio, so E(B−V) was set to 0 and no dust correction was applied. The quoted error is that of the unclipped estimate.', 'caution'],
  'balmer-from-hgamma': ['Hα was missing, so the dust correction comes from Hγ/Hβ instead of Hα/Hβ.', 'info'],
  'no-balmer-decrement': ['No usable Balmer line pair, so E(B−V) is unknown and fluxes are not dereddened.', 'caution'],
  'curve-crossing-region': ['The point lies where the Kauffmann 2003 curve runs above Kewley 2001 (far left of the [N II] diagram); it was called star-forming by convention.', 'info'],
  'overall-without-oi': ['The overall class uses the [N II] and [S II] diagrams only: [O I] was not available.', 'info'],
  'overall-without-sii': ['The overall class uses the [N II] and [O I] diagrams only: [S II] was not available.', 'info'],
  'overall-needs-nii': ['No overall class: the [N II] diagram is required and could not be placed.', 'caution'],
  'overall-from-nii-only': ['The overall class rests on the [N II] diagram alone (neither [S II] nor [O I] available); AGN were split into Seyfert and LINER by the Schawinski 2007 line.', 'caution'],
  'metallicity-not-star-forming': ['No metallicity: the strong-line calibrations hold only for star-forming nuclei, and this one is not classed star-forming.', 'info'],
  'sfr-not-star-forming': ['The Hα star-formation rate assumes all Hα comes from young stars. This nucleus is not classed star-forming, so treat the rate as an upper bound at most.', 'caution'],
  'sfr-not-dereddened': ['The star-formation rate uses the observed Hα (no E(B−V) was available), so it is likely underestimated.', 'caution'],
  'sfr-needs-halpha': ['No star-formation rate: Hα is not detected.', 'info'],
  'luminosity-needs-redshift': ['No luminosity or star-formation rate: the redshift is missing or not positive.', 'info'],
  'whan-needs-ew-halpha': ['Not on the WHAN diagram: it needs the Hα equivalent width, which was not given.', 'info'],
  'whan-passive-needs-ew-nii': ['EW(Hα) is below 0.5 Å but there is no [N II] equivalent width, so passive could not be told from retired; reported as retired.', 'info'],
  'black-hole-needs-fwhm': ['No black-hole mass: the broad Hα line width (FWHM) was not given.', 'info'],
  'black-hole-needs-redshift': ['No black-hole mass: it needs a redshift for the luminosity.', 'info'],
  'black-hole-broad-halpha-limit': ['Broad Hα is only an upper limit, so no black-hole mass is given.', 'info'],
}

/** Flags that carry what they refer to after a colon (`low-density-limit:sii`). */
const WITH_ARGUMENT: Record<string, [(arg: string) => string, FlagSeverity]> = {
  'below-min-snr': [(a) => `${lineLabel(a)} is below the project's minimum signal-to-noise, so it is treated as an upper limit (S/N threshold × error).`, 'caution'],
  'limit-not-decisive': [(a) => a === 'nii-subtype'
    ? 'A limit leaves open whether this AGN is Seyfert-like or LINER-like on the [N II] diagram.'
    : `On the ${diagramName(a)}, an upper or lower limit leaves the class open: the point could fall on either side of a line, so it is unclassified there.`, 'caution'],
  'beyond-asymptote': [(a) => `The point lies at or right of the asymptote of the ${curveName(a)} curve, which puts it on the AGN side of that curve whatever its [O III]/Hβ.`, 'info'],
  'missing-line': [(a) => `Not on the ${diagramName(a)}: one of its lines was not measured.`, 'info'],
  'nonpositive-flux': [(a) => a === 'balmer' ? 'A Balmer line flux is zero or negative, so no dust correction was possible.' : `Not on the ${diagramName(a)}: a line flux is zero or negative, so its ratio has no logarithm.`, 'caution'],
  'low-density-limit': [(a) => `The ${doublet(a)} doublet ratio is at its low-density limit: the electron density is only known to be low (below about 1 cm⁻³ in the fit), so no value is given.`, 'caution'],
  'high-density-limit': [(a) => `The ${doublet(a)} doublet ratio is at its high-density limit: the density is only known to be very high (above about 10⁵ cm⁻³), so no value is given.`, 'caution'],
  'density-needs-lines': [(a) => `No ${doublet(a)} density: both lines of the doublet must be detected.`, 'info'],
  'te-density-assumed': [(a) => `The ${ion(a)} temperature was solved with an assumed density of 100 cm⁻³, because no [S II] density was available.`, 'info'],
  'te-out-of-range': [(a) => `The ${ion(a)} auroral-line ratio has no temperature solution between 5 000 and 30 000 K.`, 'caution'],
  'te-upper-limit': [(a) => `The ${ion(a)} auroral line is not detected, so the temperature is only an upper limit and no value is given.`, 'info'],
  'te-from-fixed-doublet-ratio': [(a) => `The weaker ${ion(a)} nebular line was missing and was taken from the fixed theoretical ratio to the stronger one.`, 'info'],
  'te-needs-lines': [(a) => `No ${ion(a)} temperature: the auroral and nebular lines are needed.`, 'info'],
}

function diagramName(key: string): string {
  return (DIAGRAM_LABELS as Record<string, string>)[key] ?? `${key} diagram`
}
function doublet(key: string): string { return key === 'oii' ? '[O II]' : key === 'sii' || key === '' ? '[S II]' : key }
function ion(key: string): string { return key === 'oiii' ? '[O III]' : key === 'nii' ? '[N II]' : key }
function curveName(key: string): string {
  const [diagram, curve] = key.split('-')
  const paper = curve === 'ka03' ? 'Kauffmann 2003' : curve === 'ke01' ? 'Kewley 2001' : curve ?? key
  return `${paper} ${diagram ? diagramName(diagram).replace(' diagram', '') : ''}`.trim()
}

function words(s: string): string {
  return s.replace(/[-_:]+/g, ' ').replace(/\s+/g, ' ').trim()
}

export function describeFlag(flag: string): FlagCaution {
  const fixed = FIXED[flag]
  if (fixed) return { flag, text: fixed[0], severity: fixed[1] }

  const [head, ...rest] = flag.split(':')
  const arg = rest.join(':')
  if (head === 'ratio-limit') {
    const [key, kind] = rest
    const which = kind === 'lower' ? 'a lower limit' : 'an upper limit'
    return { flag, text: `${RATIO_LABELS[key] ?? key} is ${which}, because one of its lines is not detected.`, severity: 'info' }
  }
  const withArg = WITH_ARGUMENT[head]
  if (withArg) return { flag, text: withArg[0](arg).replace(/\s{2,}/g, ' '), severity: withArg[1] }
  // older flag spellings without the suffix still read well
  if (FIXED[head]) return { flag, text: FIXED[head][0], severity: FIXED[head][1] }

  const outOfRange = /^(.+)-out-of-range$/.exec(flag)
  if (outOfRange) {
    return { flag, text: `The ${calibrationName(outOfRange[1])} calibration was used outside the index range it was built for, so no value is given.`, severity: 'caution' }
  }
  const needsDetections = /^(.+)-needs-detections$/.exec(flag)
  if (needsDetections) {
    return { flag, text: `No ${calibrationName(needsDetections[1])} metallicity: its lines must be detected, not limits.`, severity: 'info' }
  }
  return { flag, text: `Note from the analysis: ${words(flag)}.`, severity: 'info' }
}

const CALIBRATIONS: Record<string, string> = {
  n2Pp04: 'N2 (Pettini & Pagel 2004)',
  n2Pp04Cubic: 'cubic N2 (Pettini & Pagel 2004)',
  o3n2Pp04: 'O3N2 (Pettini & Pagel 2004)',
  n2M13: 'N2 (Marino 2013)',
  o3n2M13: 'O3N2 (Marino 2013)',
  n2s2haD16: 'N2S2Hα (Dopita 2016)',
}

function calibrationName(key: string): string {
  return CALIBRATIONS[key] ?? key
}

export function describeFlags(flags: readonly string[] | null | undefined): FlagCaution[] {
  return [...new Set(flags ?? [])].map(describeFlag)
}
