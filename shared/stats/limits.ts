/**
 * Detections, upper limits and limit ratios (shared/science/README.md §9, project convention).
 */

/** State of one line of one galaxy in the kernel. */
export const LINE_ABSENT = 0
/** measured flux and error (after thresholding: F/σ ≥ minSnr) */
export const LINE_DETECTED = 1
/** an upper limit U on the flux */
export const LINE_UPPER_LIMIT = 2
/** a Monte Carlo draw that came out ≤ 0: no ratio can be formed from it (shared/science/README.md §9) */
export const LINE_NONPOSITIVE = 3

/** Limit status of a ratio or of a log ratio. */
export const RATIO_EXACT = 0
export const RATIO_UPPER = 1
export const RATIO_LOWER = 2
/** no ratio: a line missing, limits in both numerator and denominator, or a non-positive draw */
export const RATIO_NONE = 3

/**
 * Whether a measured line counts as detected: F/σ ≥ minSnr (shared/science/README.md §9, project convention).
 *
 * @param flux    F (any flux unit)
 * @param error   σ > 0 (same unit)
 * @param minSnr  threshold > 0, dimensionless
 * @returns true when detected; false means it becomes the upper limit `minSnr·σ`
 * @example isDetection(10, 2, 3) // true (S/N = 5)
 */
export function isDetection(flux: number, error: number, minSnr: number): boolean {
  return flux >= minSnr * error
}

/**
 * Upper limit given to an undetected line: U = minSnr·σ (shared/science/README.md §9, project convention).
 *
 * @param error   σ > 0 (flux unit)
 * @param minSnr  threshold > 0, dimensionless
 * @returns U in the flux unit
 * @example upperLimitFromError(2, 3) // 6
 */
export function upperLimitFromError(error: number, minSnr: number): number {
  return minSnr * error
}

/**
 * Limit status of F_num/F_den from the states of the two lines: a limit in the numerator gives an
 * upper limit, in the denominator a lower limit, in both (or a line absent/non-positive) no ratio.
 * Source: shared/science/README.md §9 (project convention).
 *
 * @param numerator    line state (LINE_*)
 * @param denominator  line state (LINE_*)
 * @returns RATIO_EXACT, RATIO_UPPER, RATIO_LOWER or RATIO_NONE
 * @example ratioLimitStatus(LINE_UPPER_LIMIT, LINE_DETECTED) // RATIO_UPPER
 */
export function ratioLimitStatus(numerator: number, denominator: number): number {
  if (numerator === LINE_DETECTED) {
    if (denominator === LINE_DETECTED) return RATIO_EXACT
    return denominator === LINE_UPPER_LIMIT ? RATIO_LOWER : RATIO_NONE
  }
  if (numerator === LINE_UPPER_LIMIT && denominator === LINE_DETECTED) return RATIO_UPPER
  return RATIO_NONE
}

/**
 * State of the sum of two lines (e.g. [S II] 6717 + 6731): detected if both are detected, an upper
 * limit if both are known and at least one is a limit (the sum of the values bounds the sum from
 * above), otherwise unusable. Source: project convention following shared/science/README.md §9.
 *
 * @param a  line state
 * @param b  line state
 * @returns the state of the sum
 * @example stateOfSum(LINE_DETECTED, LINE_UPPER_LIMIT) // LINE_UPPER_LIMIT
 */
export function stateOfSum(a: number, b: number): number {
  if (a === LINE_DETECTED && b === LINE_DETECTED) return LINE_DETECTED
  if ((a === LINE_DETECTED || a === LINE_UPPER_LIMIT) && (b === LINE_DETECTED || b === LINE_UPPER_LIMIT)) return LINE_UPPER_LIMIT
  if (a === LINE_NONPOSITIVE || b === LINE_NONPOSITIVE) return LINE_NONPOSITIVE
  return LINE_ABSENT
}
