import { describe, expect, it } from 'vitest'
import { CLASS_PASSIVE, CLASS_RETIRED, CLASS_STAR_FORMING, CLASS_STRONG_AGN, CLASS_UNCLASSIFIED, CLASS_WEAK_AGN } from '../../../../shared/vocabulary/classes.ts'
import { whanClass } from '../../../../shared/diagnostics/whan.ts'
import { RATIO_EXACT, RATIO_LOWER, RATIO_NONE, RATIO_UPPER } from '../../../../shared/stats/limits.ts'

describe('whanClass (Cid Fernandes et al. 2011, MNRAS 413, 1687)', () => {
  it('reproduces the shared/science/README.md §2.5 checks', () => {
    // shared/science/README.md §2.5 check values (project tie-breaking)
    expect(whanClass(-0.395, RATIO_EXACT, 6.05, Number.NaN)).toBe(CLASS_STRONG_AGN)
    expect(whanClass(-0.55, RATIO_EXACT, 42, Number.NaN)).toBe(CLASS_STAR_FORMING)
    expect(whanClass(-0.2, RATIO_EXACT, 2.2, Number.NaN)).toBe(CLASS_RETIRED)
    expect(whanClass(-0.2, RATIO_EXACT, 0.3, 0.2)).toBe(CLASS_PASSIVE)
    expect(whanClass(-0.2, RATIO_EXACT, 4.5, 0.15)).toBe(CLASS_WEAK_AGN)
  })
  it('breaks ties as shared/science/README.md §10 fixes them', () => {
    // project convention: x ≥ −0.4 AGN, W ≥ 3 not retired, W > 6 strong
    expect(whanClass(-0.4, RATIO_EXACT, 10, Number.NaN)).toBe(CLASS_STRONG_AGN)
    expect(whanClass(-0.5, RATIO_EXACT, 3, Number.NaN)).toBe(CLASS_STAR_FORMING)
    expect(whanClass(-0.3, RATIO_EXACT, 6, Number.NaN)).toBe(CLASS_WEAK_AGN)
  })
  it('needs EW([N II]) for passive and uses x limits as §9 says', () => {
    expect(whanClass(-0.2, RATIO_EXACT, 0.3, Number.NaN)).toBe(CLASS_RETIRED)
    // x upper limit < −0.4 with W ≥ 3 → star-forming (shared/science/README.md §9)
    expect(whanClass(-0.6, RATIO_UPPER, 10, Number.NaN)).toBe(CLASS_STAR_FORMING)
    expect(whanClass(-0.6, RATIO_LOWER, 10, Number.NaN)).toBe(CLASS_UNCLASSIFIED)
    expect(whanClass(-0.2, RATIO_LOWER, 10, Number.NaN)).toBe(CLASS_STRONG_AGN)
    expect(whanClass(-0.2, RATIO_UPPER, 10, Number.NaN)).toBe(CLASS_UNCLASSIFIED)
    expect(whanClass(Number.NaN, RATIO_NONE, 10, Number.NaN)).toBe(CLASS_UNCLASSIFIED)
    expect(whanClass(Number.NaN, RATIO_NONE, 1, Number.NaN)).toBe(CLASS_RETIRED) // W alone decides retired
  })
})
