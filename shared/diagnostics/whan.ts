import * as __limits from '../stats/limits.ts'
import { CLASS_PASSIVE, CLASS_RETIRED, CLASS_STAR_FORMING, CLASS_STRONG_AGN, CLASS_UNCLASSIFIED, CLASS_WEAK_AGN } from '../vocabulary/classes.ts'
// imported constants copied into module scope: V8 reads module-local constants in hot loops without
// the per-access initialisation check that imported bindings need
const RATIO_EXACT = __limits.RATIO_EXACT
const RATIO_LOWER = __limits.RATIO_LOWER
const RATIO_NONE = __limits.RATIO_NONE
const RATIO_UPPER = __limits.RATIO_UPPER

/**
 * WHAN diagram boundaries: Cid Fernandes et al. 2011, MNRAS 413, 1687 (shared/science/README.md §2.5).
 * x = log([N II]/Hα) = −0.4 splits star-forming from AGN; W = EW(Hα) in Å, emission positive.
 */
export const WHAN = {
  /** star-forming / AGN split in log([N II]6584/Hα), dex */
  xSplit: -0.4,
  /** below this EW(Hα) (Å) a nucleus is retired (or passive) */
  retiredMaxEw: 3,
  /** strong-AGN / weak-AGN split in EW(Hα), Å */
  strongAgnMinEw: 6,
  /** passive: EW(Hα) and EW([N II]) both below this, Å */
  passiveMaxEw: 0.5,
} as const

/**
 * WHAN class (Cid Fernandes et al. 2011, MNRAS 413, 1687), with the project's tie-breaking
 * (shared/science/README.md §2.5, §10: x ≥ −0.4 is AGN, W ≥ 3 Å is not retired, W > 6 Å is strong):
 * passive if W < 0.5 and W([N II]) < 0.5; retired if W < 3; star-forming if x < −0.4; strong AGN if
 * W > 6; else weak AGN. Limits on x follow shared/science/README.md §9 (an upper limit proves star-forming if
 * below −0.4; a lower limit proves AGN if ≥ −0.4).
 *
 * @param x        log([N II]6584/Hα), dex (ignored when xStatus is RATIO_NONE)
 * @param xStatus  RATIO_EXACT | RATIO_UPPER | RATIO_LOWER | RATIO_NONE
 * @param ewHalpha EW(Hα), Å, emission positive
 * @param ewNii    EW([N II]6584), Å, or NaN when not given
 * @returns class code; CLASS_UNCLASSIFIED when x is needed and missing or not decisive
 * @example whanClass(-0.395, 0, 6.05, NaN) // CLASS_STRONG_AGN (shared/science/README.md §2.5 check)
 */
export function whanClass(x: number, xStatus: number, ewHalpha: number, ewNii: number): number {
  if (ewHalpha < WHAN.retiredMaxEw) {
    return ewHalpha < WHAN.passiveMaxEw && ewNii < WHAN.passiveMaxEw ? CLASS_PASSIVE : CLASS_RETIRED
  }
  if (xStatus === RATIO_NONE) return CLASS_UNCLASSIFIED
  const agn = ewHalpha > WHAN.strongAgnMinEw ? CLASS_STRONG_AGN : CLASS_WEAK_AGN
  if (x < WHAN.xSplit) return xStatus === RATIO_EXACT || xStatus === RATIO_UPPER ? CLASS_STAR_FORMING : CLASS_UNCLASSIFIED
  return xStatus === RATIO_EXACT || xStatus === RATIO_LOWER ? agn : CLASS_UNCLASSIFIED
}
