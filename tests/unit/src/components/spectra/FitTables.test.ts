import { describe, expect, it } from 'vitest'
import { mount } from '@vue/test-utils'
import { createVuetify } from 'vuetify'
import FitCompareTable from '../../../../../src/components/spectra/FitCompareTable.vue'
import FitNumbersTable from '../../../../../src/components/spectra/FitNumbersTable.vue'
import type { SpectrumFitResult } from '../../../../../src/api/spectra-types'

const line = (flux: number, velocity: number, sigmaIntrinsic: number) => ({
  detected: true as const, flux, error: flux / 25, snr: 25, ew: 30, ewError: 0.8, velocity, velocityError: 4, sigma: sigmaIntrinsic + 15, sigmaError: 5, sigmaIntrinsic,
})
const stored: SpectrumFitResult = {
  id: 'G', lines: { halpha: line(600, 10, 110), nii_6584: line(150, 12, 105), oi_6300: { detected: false, upperLimit: 9 } },
  absorption: { nad: { detected: false, ewUpperLimit: 0.4, flags: [], note: 'Na I D includes interstellar and stellar absorption.' } },
  fit: { chi2: 2100, dof: 2000, components: 1, broadHalpha: false }, measurements: { lines: {}, ew: {}, fwhm: {} }, flags: [],
}
const plugins = [createVuetify()]
const rowText = (html: ReturnType<typeof mount>, line: string) => html.find(`tr[data-line="${line}"]`).findAll('td').map((c) => c.text().trim()).join(' | ')

describe('fitted numbers table', () => {
  it('writes each line with its errors, a limit for an undetected line, and Na I D', () => {
    const w = mount(FitNumbersTable, { props: { result: stored, fluxUnit: 1e-17 }, global: { plugins } })
    expect(rowText(w, 'halpha')).toBe('Hα 6563 | 600 ± 24 | 25.0 | 30.0 | 10 ± 4 | 110 ± 5')
    expect(rowText(w, 'oi_6300')).toBe('[O I] 6300 | < 9.00 | not detected (upper limit)')
    expect(w.find('[data-testid="fit-nad"]').text()).toMatch(/Not detected: EW < 0\.40 Å/)
    expect(w.text()).toContain('Fluxes in 1e-17 erg s⁻¹ cm⁻²')
  })
})

describe('refit comparison table', () => {
  it('shows stored, refit and the difference, and marks a large change', () => {
    const refit: SpectrumFitResult = { ...stored, lines: { ...stored.lines, halpha: line(690, 40, 112) }, fit: { chi2: 2010, dof: 1996, components: 2, broadHalpha: true } }
    const w = mount(FitCompareTable, { props: { before: stored, after: refit }, global: { plugins } })
    expect(rowText(w, 'halpha')).toBe('Hα 6563 | 600.00 | 690.00 | +15.0 % | 10 | 40 | +30 | 110 | 112 | +2')
    expect(w.find('tr[data-line="halpha"]').findAll('td.big').map((c) => c.text())).toEqual(['+15.0 %', '+30'])
    expect(rowText(w, 'oi_6300')).toBe('[O I] 6300 | limit | limit | — | — | — | — | — | — | —')
    expect(w.findAll('.summary > span').map((x) => x.text())).toEqual(['χ²/dof 1.050 → 1.007', 'components 1 → 2', 'broad Hα no → yes', 'detections 2 → 2'])
  })
})
