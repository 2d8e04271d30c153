import * as __limits from '../stats/limits.ts'
import {
  CLASS_AGN, CLASS_AMBIGUOUS, CLASS_COMPOSITE, CLASS_LINER, CLASS_SEYFERT, CLASS_STAR_FORMING, CLASS_UNCLASSIFIED,
} from '../vocabulary/classes.ts'
import { isBelowHyperbola, KA03, KE01_NII, KE01_OI, KE01_SII, KE06_OI, KE06_SII, S07_NII, type HyperbolaCurve, type StraightLine } from './demarcation.ts'
// imported constants copied into module scope: V8 reads module-local constants in hot loops without
// the per-access initialisation check that imported bindings need
const RATIO_EXACT = __limits.RATIO_EXACT
const RATIO_LOWER = __limits.RATIO_LOWER
const RATIO_UPPER = __limits.RATIO_UPPER

/**
 * Class on the [N II] diagram (Baldwin, Phillips & Terlevich 1981, PASP 93, 5 type): star-forming
 * below Kauffmann et al. 2003 (MNRAS 346, 1055, eq. 1), composite between Ka03 and Kewley et al. 2001
 * (ApJ 556, 121, eq. 5), AGN above Ke01; strict inequalities, and a point at or right of an
 * asymptote is on the AGN side of that curve (shared/science/README.md §2.3, §2.2).
 *
 * @param x  log([N II]6584/Hα), dex
 * @param y  log([O III]5007/Hβ), dex
 * @returns CLASS_STAR_FORMING, CLASS_COMPOSITE or CLASS_AGN
 * @example classifyNiiPoint(0.1, -1) // CLASS_COMPOSITE (right of the Ka03 asymptote, below Ke01)
 */
export function classifyNiiPoint(x: number, y: number): number {
  if (isBelowHyperbola(KA03, x, y)) return CLASS_STAR_FORMING
  if (isBelowHyperbola(KE01_NII, x, y)) return CLASS_COMPOSITE
  return CLASS_AGN
}

function classifySeyfertLiner(ke01: HyperbolaCurve, ke06: StraightLine, x: number, y: number): number {
  if (isBelowHyperbola(ke01, x, y)) return CLASS_STAR_FORMING
  return y > ke06.m * x + ke06.q ? CLASS_SEYFERT : CLASS_LINER
}

/**
 * Class on the [S II] diagram: star-forming below Kewley et al. 2001 eq. 6 (left of x = 0.32);
 * otherwise Seyfert above, LINER on or below, the Kewley et al. 2006 (MNRAS 372, 961) line
 * y = 1.89 x + 0.76 (shared/science/README.md §2.3).
 *
 * @param x  log(([S II]6717+6731)/Hα), dex
 * @param y  log([O III]5007/Hβ), dex
 * @returns CLASS_STAR_FORMING, CLASS_SEYFERT or CLASS_LINER
 * @example classifySiiPoint(-0.2, 1) // CLASS_SEYFERT
 */
export function classifySiiPoint(x: number, y: number): number {
  return classifySeyfertLiner(KE01_SII, KE06_SII, x, y)
}

/**
 * Class on the [O I] diagram: star-forming below Kewley et al. 2001 eq. 7 (left of x = −0.59);
 * otherwise Seyfert above, LINER on or below, Kewley et al. 2006 y = 1.18 x + 1.30 (shared/science/README.md §2.3).
 *
 * @param x  log([O I]6300/Hα), dex
 * @param y  log([O III]5007/Hβ), dex
 * @returns CLASS_STAR_FORMING, CLASS_SEYFERT or CLASS_LINER
 * @example classifyOiPoint(-0.5, 0) // CLASS_LINER
 */
export function classifyOiPoint(x: number, y: number): number {
  return classifySeyfertLiner(KE01_OI, KE06_OI, x, y)
}

/**
 * Seyfert/LINER subtype of an [N II] AGN by the Schawinski et al. 2007 (MNRAS 382, 1415) line
 * y = 1.05 x + 0.45: Seyfert above, LINER on or below.
 *
 * @param x  log([N II]6584/Hα), dex
 * @param y  log([O III]5007/Hβ), dex
 * @returns CLASS_SEYFERT or CLASS_LINER
 * @example niiSubtypeOfPoint(0, 1) // CLASS_SEYFERT
 */
export function niiSubtypeOfPoint(x: number, y: number): number {
  return y > S07_NII.m * x + S07_NII.q ? CLASS_SEYFERT : CLASS_LINER
}

function upperOk(status: number): boolean {
  return status === RATIO_EXACT || status === RATIO_UPPER
}
function lowerOk(status: number): boolean {
  return status === RATIO_EXACT || status === RATIO_LOWER
}

/**
 * Whether the class of a point built from limits is proven (shared/science/README.md §9, project convention).
 * All SF/AGN curves fall with x, so the star-forming region is a lower set and the AGN region an
 * upper set; the Seyfert side of a rising line is upper-left. Hence the limit point proves:
 * star-forming if every limit is an upper limit; AGN if every limit is a lower limit; Seyfert if the
 * only limit is a lower limit on y; LINER if the only limit is a lower limit on x; composite never.
 *
 * @param cls      class of the point (x, y) taken at face value (CLASS_*)
 * @param xStatus  RATIO_EXACT, RATIO_UPPER or RATIO_LOWER for x
 * @param yStatus  same for y
 * @returns `cls` when proven (or when both are exact), else CLASS_UNCLASSIFIED
 * @example classProvenByLimits(CLASS_STAR_FORMING, RATIO_UPPER, RATIO_EXACT) // CLASS_STAR_FORMING
 */
export function classProvenByLimits(cls: number, xStatus: number, yStatus: number): number {
  if (xStatus === RATIO_EXACT && yStatus === RATIO_EXACT) return cls
  switch (cls) {
    case CLASS_STAR_FORMING:
      return upperOk(xStatus) && upperOk(yStatus) ? cls : CLASS_UNCLASSIFIED
    case CLASS_AGN:
      return lowerOk(xStatus) && lowerOk(yStatus) ? cls : CLASS_UNCLASSIFIED
    case CLASS_SEYFERT:
      return xStatus === RATIO_EXACT && yStatus === RATIO_LOWER ? cls : CLASS_UNCLASSIFIED
    case CLASS_LINER:
      return yStatus === RATIO_EXACT && xStatus === RATIO_LOWER ? cls : CLASS_UNCLASSIFIED
    default:
      return CLASS_UNCLASSIFIED
  }
}

/**
 * Combined class from the three diagrams, after Kewley et al. 2006, MNRAS 372, 961, §4 (rule wording
 * from memory, shared/science/README.md §12), with the project's conventions for missing diagrams (shared/science/README.md §2.4):
 *   star-forming: SF on [N II], [S II] and [O I]; composite: composite on [N II], SF on [S II] and [O I];
 *   Seyfert: AGN on [N II], Seyfert on [S II] and [O I]; LINER: AGN on [N II], LINER on both;
 *   otherwise ambiguous. An unclassified [S II] or [O I] is left out (flag `overall-without-sii`/`-oi`);
 *   with both out the class is [N II]'s, AGN split by the S07 subtype (`overall-from-nii-only`);
 *   an unclassified [N II] gives unclassified (`overall-needs-nii`).
 *
 * @param nii      [N II] class code
 * @param sii      [S II] class code (CLASS_UNCLASSIFIED when missing)
 * @param oi       [O I] class code
 * @param subtype  S07 subtype of an [N II] AGN (CLASS_SEYFERT, CLASS_LINER or CLASS_UNCLASSIFIED)
 * @returns overall class code
 * @example overallClass(CLASS_AGN, CLASS_SEYFERT, CLASS_SEYFERT, CLASS_SEYFERT) // CLASS_SEYFERT
 */
export function overallClass(nii: number, sii: number, oi: number, subtype: number): number {
  if (nii === CLASS_UNCLASSIFIED) return CLASS_UNCLASSIFIED
  const haveS = sii !== CLASS_UNCLASSIFIED
  const haveO = oi !== CLASS_UNCLASSIFIED
  if (!haveS && !haveO) {
    if (nii === CLASS_AGN) return subtype === CLASS_SEYFERT || subtype === CLASS_LINER ? subtype : CLASS_UNCLASSIFIED
    return nii
  }
  // the one or two side diagrams must agree with each other
  let side: number
  if (haveS && haveO) {
    if (sii !== oi) return CLASS_AMBIGUOUS
    side = sii
  } else side = haveS ? sii : oi
  if (side === CLASS_STAR_FORMING) {
    return nii === CLASS_STAR_FORMING || nii === CLASS_COMPOSITE ? nii : CLASS_AMBIGUOUS
  }
  return nii === CLASS_AGN ? side : CLASS_AMBIGUOUS
}
