import { describe, expect, it } from 'vitest'
import { classifyNiiPoint, classifyOiPoint, classifySiiPoint, classProvenByLimits, niiSubtypeOfPoint, overallClass } from '../../../../shared/diagnostics/bpt.ts'
import {
  CLASS_AGN, CLASS_AMBIGUOUS, CLASS_COMPOSITE, CLASS_LINER, CLASS_SEYFERT, CLASS_STAR_FORMING, CLASS_UNCLASSIFIED,
} from '../../../../shared/vocabulary/classes.ts'
import { RATIO_EXACT, RATIO_LOWER, RATIO_UPPER } from '../../../../shared/stats/limits.ts'

describe('[N II] diagram classes (shared/science/README.md §2.3)', () => {
  it('separates star-forming, composite and AGN by Ka03 and Ke01', () => {
    // Kauffmann et al. 2003 and Kewley et al. 2001 curves; at x = −0.4: Ka03 −0.0556, Ke01 0.4889 (shared/science/README.md §2.2)
    expect(classifyNiiPoint(-0.4, -0.1)).toBe(CLASS_STAR_FORMING)
    expect(classifyNiiPoint(-0.4, 0.2)).toBe(CLASS_COMPOSITE)
    expect(classifyNiiPoint(-0.4, 0.6)).toBe(CLASS_AGN)
  })
  it('puts a point at or right of an asymptote on the AGN side (the Ka03 trap at x = 0.10)', () => {
    // shared/science/README.md §2.2: Ka03(0.10) evaluated naively = +13.5 would call (0.10, 0.0) star-forming
    expect(classifyNiiPoint(0.1, -1)).toBe(CLASS_COMPOSITE) // Ke01(0.10) = −0.4586
    expect(classifyNiiPoint(0.1, 0)).toBe(CLASS_AGN)
    expect(classifyNiiPoint(0.05, -3)).toBe(CLASS_COMPOSITE)
    expect(classifyNiiPoint(0.6, -2)).toBe(CLASS_AGN)
  })
  it('treats a point exactly on a curve as not below it (strict inequalities)', () => {
    // shared/science/README.md §2.3 strict inequalities: y = Ka03(−0.5) = 0.19091 is not star-forming
    expect(classifyNiiPoint(-0.5, 0.61 / (-0.55) + 1.3)).toBe(CLASS_COMPOSITE)
  })
  it('gives the S07 subtype (Schawinski et al. 2007, MNRAS 382, 1415)', () => {
    expect(niiSubtypeOfPoint(0, 1)).toBe(CLASS_SEYFERT)
    expect(niiSubtypeOfPoint(0.3, 0.3)).toBe(CLASS_LINER)
  })
})

describe('[S II] and [O I] diagram classes', () => {
  it('split AGN into Seyfert and LINER by Kewley et al. 2006', () => {
    // Ke06 [S II] y = 1.89x + 0.76; Ke06 [O I] y = 1.18x + 1.30 (shared/science/README.md §2.2)
    expect(classifySiiPoint(-0.6, -0.2)).toBe(CLASS_STAR_FORMING)
    expect(classifySiiPoint(-0.1, 1)).toBe(CLASS_SEYFERT)
    expect(classifySiiPoint(0, 0.3)).toBe(CLASS_LINER)
    expect(classifyOiPoint(-1.8, -0.5)).toBe(CLASS_STAR_FORMING)
    expect(classifyOiPoint(-0.8, 1)).toBe(CLASS_SEYFERT)
    expect(classifyOiPoint(-0.5, 0)).toBe(CLASS_LINER)
    expect(classifySiiPoint(0.4, -1)).toBe(CLASS_LINER) // right of the Ke01 asymptote x = 0.32
  })
})

describe('classes from limits (shared/science/README.md §9)', () => {
  it('star-forming needs every limit to be an upper limit', () => {
    // [N II] undetected (x upper), point below Ka03 → star-forming (shared/science/README.md §9 example)
    expect(classProvenByLimits(CLASS_STAR_FORMING, RATIO_UPPER, RATIO_EXACT)).toBe(CLASS_STAR_FORMING)
    expect(classProvenByLimits(CLASS_STAR_FORMING, RATIO_LOWER, RATIO_EXACT)).toBe(CLASS_UNCLASSIFIED)
  })
  it('AGN needs every limit to be a lower limit', () => {
    // Hβ undetected (y lower), point above Ke01 → agn (shared/science/README.md §9 example)
    expect(classProvenByLimits(CLASS_AGN, RATIO_EXACT, RATIO_LOWER)).toBe(CLASS_AGN)
    expect(classProvenByLimits(CLASS_AGN, RATIO_UPPER, RATIO_EXACT)).toBe(CLASS_UNCLASSIFIED)
  })
  it('never proves composite; Seyfert only by a lower y limit, LINER only by a lower x limit', () => {
    // [O III] upper limit, point between Ka03 and Ke01 → unclassified (shared/science/README.md §9 example)
    expect(classProvenByLimits(CLASS_COMPOSITE, RATIO_EXACT, RATIO_UPPER)).toBe(CLASS_UNCLASSIFIED)
    expect(classProvenByLimits(CLASS_SEYFERT, RATIO_EXACT, RATIO_LOWER)).toBe(CLASS_SEYFERT)
    expect(classProvenByLimits(CLASS_SEYFERT, RATIO_LOWER, RATIO_EXACT)).toBe(CLASS_UNCLASSIFIED)
    expect(classProvenByLimits(CLASS_LINER, RATIO_LOWER, RATIO_EXACT)).toBe(CLASS_LINER)
    expect(classProvenByLimits(CLASS_LINER, RATIO_EXACT, RATIO_LOWER)).toBe(CLASS_UNCLASSIFIED)
  })
})

describe('overall class (Kewley et al. 2006 §4 with shared/science/README.md §2.4 conventions)', () => {
  it('follows the five rules', () => {
    // Kewley et al. 2006, MNRAS 372, 961, §4 (rule wording from memory, shared/science/README.md §12), as shared/science/README.md §2.4
    expect(overallClass(CLASS_STAR_FORMING, CLASS_STAR_FORMING, CLASS_STAR_FORMING, 0)).toBe(CLASS_STAR_FORMING)
    expect(overallClass(CLASS_COMPOSITE, CLASS_STAR_FORMING, CLASS_STAR_FORMING, 0)).toBe(CLASS_COMPOSITE)
    expect(overallClass(CLASS_AGN, CLASS_SEYFERT, CLASS_SEYFERT, CLASS_SEYFERT)).toBe(CLASS_SEYFERT)
    expect(overallClass(CLASS_AGN, CLASS_LINER, CLASS_LINER, CLASS_LINER)).toBe(CLASS_LINER)
    expect(overallClass(CLASS_AGN, CLASS_SEYFERT, CLASS_LINER, CLASS_SEYFERT)).toBe(CLASS_AMBIGUOUS)
    expect(overallClass(CLASS_STAR_FORMING, CLASS_SEYFERT, CLASS_SEYFERT, 0)).toBe(CLASS_AMBIGUOUS)
    expect(overallClass(CLASS_COMPOSITE, CLASS_LINER, CLASS_LINER, 0)).toBe(CLASS_AMBIGUOUS)
  })
  it('applies the missing-diagram conventions', () => {
    // shared/science/README.md §2.4 (project convention)
    expect(overallClass(CLASS_UNCLASSIFIED, CLASS_STAR_FORMING, CLASS_STAR_FORMING, 0)).toBe(CLASS_UNCLASSIFIED)
    expect(overallClass(CLASS_AGN, CLASS_UNCLASSIFIED, CLASS_SEYFERT, CLASS_LINER)).toBe(CLASS_SEYFERT)
    expect(overallClass(CLASS_AGN, CLASS_UNCLASSIFIED, CLASS_UNCLASSIFIED, CLASS_LINER)).toBe(CLASS_LINER)
    expect(overallClass(CLASS_COMPOSITE, CLASS_UNCLASSIFIED, CLASS_UNCLASSIFIED, 0)).toBe(CLASS_COMPOSITE)
  })
})
