import { describe, expect, it } from 'vitest'
import { mount } from '@vue/test-utils'
import { createVuetify } from 'vuetify'
import DiagnosticsPanel from '../../../../../src/components/galaxy/DiagnosticsPanel.vue'
import { diagnoseGalaxy } from '../../../../../src/utils/science'

// The panel is fed the shared library's own output, so a change of result shape shows up here.
const result = diagnoseGalaxy({
  id: 'LNS-0000001', redshift: 0.05, fluxUnit: 1e-17,
  lines: {
    halpha: { flux: 300, error: 6 }, hbeta: { flux: 80, error: 3 }, oiii_5007: { flux: 60, error: 3 }, nii_6584: { flux: 75, error: 3 },
    sii_6717: { flux: 40, error: 2 }, sii_6731: { flux: 30, error: 2 }, oi_6300: { upperLimit: 6 },
  },
  ew: { halpha: 24.5 },
}, {})

function mountPanel() {
  return mount(DiagnosticsPanel, { props: { result }, global: { plugins: [createVuetify()] } })
}

describe('DiagnosticsPanel', () => {
  it('shows E(B−V) with its error and unit', () => {
    const text = mountPanel().get('[data-testid="value-ebv"]').text()
    expect(text).toMatch(/E\(B−V\)\s*0\.\d{3} ± 0\.\d{3} mag/)
  })

  it('shows every class and the upper limit on [O I]/Hα', () => {
    const w = mountPanel()
    expect(w.get('[data-testid="class-overall"]').text()).toMatch(/Overall/)
    expect(w.text()).toMatch(/log \[O I\]\/Hα\s*< -/)
  })

  it('writes flags as plain cautions, never only as codes', () => {
    const w = mountPanel()
    expect(result.flags?.length).toBeGreaterThan(0)
    const items = w.findAll('[data-testid="flag-list"] li')
    expect(items.length).toBeGreaterThanOrEqual(new Set(result.flags).size)
    for (const li of items) expect(li.text().length).toBeGreaterThan(30)
  })
})
