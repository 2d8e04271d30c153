import { describe, expect, it } from 'vitest'
import {
  isDetection, LINE_ABSENT, LINE_DETECTED, LINE_NONPOSITIVE, LINE_UPPER_LIMIT, RATIO_EXACT, RATIO_LOWER, RATIO_NONE, RATIO_UPPER,
  ratioLimitStatus, stateOfSum, upperLimitFromError,
} from '../../../../shared/stats/limits.ts'

describe('detections and limits (shared/science/README.md §9, project convention)', () => {
  it('thresholds at minSnr and sets U = minSnr·σ', () => {
    expect(isDetection(9, 3, 3)).toBe(true)
    expect(isDetection(8.99, 3, 3)).toBe(false)
    expect(isDetection(-5, 3, 3)).toBe(false)
    expect(upperLimitFromError(2, 3)).toBe(6)
  })
  it('numerator limit → upper, denominator limit → lower, both → none', () => {
    expect(ratioLimitStatus(LINE_DETECTED, LINE_DETECTED)).toBe(RATIO_EXACT)
    expect(ratioLimitStatus(LINE_UPPER_LIMIT, LINE_DETECTED)).toBe(RATIO_UPPER)
    expect(ratioLimitStatus(LINE_DETECTED, LINE_UPPER_LIMIT)).toBe(RATIO_LOWER)
    expect(ratioLimitStatus(LINE_UPPER_LIMIT, LINE_UPPER_LIMIT)).toBe(RATIO_NONE)
    expect(ratioLimitStatus(LINE_ABSENT, LINE_DETECTED)).toBe(RATIO_NONE)
    expect(ratioLimitStatus(LINE_NONPOSITIVE, LINE_DETECTED)).toBe(RATIO_NONE)
  })
  it('a sum with a limit is an upper limit', () => {
    expect(stateOfSum(LINE_DETECTED, LINE_DETECTED)).toBe(LINE_DETECTED)
    expect(stateOfSum(LINE_DETECTED, LINE_UPPER_LIMIT)).toBe(LINE_UPPER_LIMIT)
    expect(stateOfSum(LINE_DETECTED, LINE_ABSENT)).toBe(LINE_ABSENT)
  })
})
