import { describe, expect, it } from 'vitest'
import { fmtMeasured, fmtToError, intakeSource } from '../../../../src/utils/format'

describe('fmtMeasured', () => {
  it('rounds the error to one or two significant digits and the value to the same decimal (PDG rounding rule, common practice)', () => {
    expect(fmtMeasured(646.4123, 1.31)).toBe('646.4 ± 1.3') // leading digits 131 < 355: two digits
    expect(fmtMeasured(18.6021, 0.093)).toBe('18.60 ± 0.09') // 930 ≥ 355: one digit
    expect(fmtMeasured(0.45, 1.8)).toBe('0.5 ± 1.8')
    expect(fmtMeasured(-0.04, 1.8)).toBe('0.0 ± 1.8')
    expect(fmtMeasured(15012, 310)).toBe('15012 ± 310')
    expect(fmtMeasured(110.4, 5.4)).toBe('110 ± 5')
    expect(fmtToError(47.1888, 0.13)).toBe('47.19')
  })

  it('falls back without a usable error', () => {
    expect(fmtMeasured(12.345, null)).toBe('12.345')
    expect(fmtMeasured(12.345, 0)).toBe('12.345')
    expect(fmtMeasured(null, 1)).toBe('—')
  })
})

describe('intakeSource', () => {
  it('names CSV files, spectra uploads and API batches', () => {
    expect(intakeSource('csv', 'survey.csv')).toBe('survey.csv')
    expect(intakeSource('csv', null)).toBe('CSV file')
    expect(intakeSource('spectra', 'a.fits and 2 more')).toBe('Spectra: a.fits and 2 more')
    expect(intakeSource('api', null)).toBe('API batch')
  })
})
