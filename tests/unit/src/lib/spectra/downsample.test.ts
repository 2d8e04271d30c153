import { describe, expect, it } from 'vitest'
import { displayIndices, isRun, lowerBound, take, upperBound } from '../../../../../src/lib/spectra/downsample'

const ramp = (n: number, f: (i: number) => number) => Array.from({ length: n }, (_, i) => f(i))

describe('display decimation', () => {
  it('binary searches an ascending axis', () => {
    const x = [1, 2, 2, 3]
    expect(lowerBound(x, 2)).toBe(1)
    expect(upperBound(x, 2)).toBe(3)
    expect(lowerBound(x, 0)).toBe(0)
    expect(upperBound(x, 9)).toBe(4)
  })

  it('draws a window with fewer pixels than two per bucket whole, one pixel beyond each end', () => {
    const x = ramp(100, (i) => 4000 + i)
    expect(Array.from(displayIndices(x, [x], 4010.5, 4020.5, 50))).toEqual(ramp(12, (i) => 10 + i))
    expect(Array.from(displayIndices(x, [x], 3000, 3500, 50))).toEqual([0])
    expect(displayIndices([], [[]], 0, 1, 10).length).toBe(0)
  })

  it('keeps a one-pixel line and a one-pixel dip among 50,000 pixels in 1,000 buckets', () => {
    const n = 50_000
    const x = ramp(n, (i) => 3800 + 0.1 * i)
    const flux = ramp(n, (i) => (i === 31_337 ? 50 : i === 12_345 ? -20 : Math.sin(i / 7)))
    const idx = displayIndices(x, [flux], x[0], x[n - 1], 1000)
    expect(idx.length).toBeLessThanOrEqual(3 * 1000 + 1)
    expect(idx.length).toBeGreaterThan(1000)
    expect(Array.from(idx)).toContain(31_337)
    expect(Array.from(idx)).toContain(12_345)
    // ascending, no repeats, both ends
    for (let k = 1; k < idx.length; k++) expect(idx[k]).toBeGreaterThan(idx[k - 1])
    expect(idx[0]).toBe(0)
    expect(idx[idx.length - 1]).toBe(n - 1)
  })

  it('keeps the extremes of every series given (data and model)', () => {
    const n = 10_000
    const x = ramp(n, (i) => i)
    const data = ramp(n, () => 1)
    const model = ramp(n, (i) => (i === 7_777 ? 9 : 1))
    expect(Array.from(displayIndices(x, [data], 0, n, 100))).not.toContain(7_777)
    expect(Array.from(displayIndices(x, [data, model], 0, n, 100))).toContain(7_777)
  })

  it('ignores bad pixels when finding extremes but keeps a gap that fills a bucket', () => {
    const n = 1000
    const x = ramp(n, (i) => i)
    const flux: (number | null)[] = ramp(n, (i) => i % 10)
    for (let i = 500; i < 600; i++) flux[i] = null
    const idx = displayIndices(x, [flux], 0, n, 50)
    const y = take(flux, idx)
    expect(Array.from(y).some((v, k) => Number.isNaN(v) && idx[k] >= 500 && idx[k] < 600)).toBe(true)
    expect(Array.from(take([1, NaN, null, Infinity, 2], Int32Array.from([0, 1, 2, 3, 4])))).toEqual([1, NaN, NaN, NaN, 2])
  })

  it('hands a window drawn whole over as a view on the curve, not a copy', () => {
    const curve = Float64Array.from(ramp(100, (i) => i))
    const run = take(curve, Int32Array.from([10, 11, 12]))
    expect(Array.from(run)).toEqual([10, 11, 12])
    expect(run.buffer).toBe(curve.buffer)
    expect(isRun(Int32Array.from([3, 4, 5]))).toBe(true)
    expect(isRun(Int32Array.from([3, 5]))).toBe(false)
    expect(Array.from(take(curve, Int32Array.from([1, 50])))).toEqual([1, 50])
  })
})
