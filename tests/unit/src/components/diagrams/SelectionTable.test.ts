import { describe, expect, it } from 'vitest'
import { mount, RouterLinkStub } from '@vue/test-utils'
import { createVuetify } from 'vuetify'
import SelectionTable from '../../../../../src/components/diagrams/SelectionTable.vue'
import type { DiagramColumns } from '../../../../../src/api/types'
import { prepareDiagramArrays } from '../../../../../src/lib/diagrams/diagram-arrays'

const n = 5
const columns: DiagramColumns = {
  revision: 1, count: n, ids: ['LNS-1', 'LNS-2', 'LNS-3', 'LNS-4', 'LNS-5'], redshift: [0.1, 0.2, 0.3, 0.4, 0.5],
  class: { overall: [0, 1, 2, 3, 5], nii: [0, 1, 2, 2, 3], sii: [0, 0, 1, 2, 3], oi: [0, 0, 1, 2, 3], whan: [0, 0, 1, 2, 5] },
  classNames: {
    overall: ['star-forming', 'composite', 'seyfert', 'liner', 'ambiguous', 'unclassified'],
    nii: ['star-forming', 'composite', 'agn', 'unclassified'], sii: ['star-forming', 'seyfert', 'liner', 'unclassified'],
    oi: ['star-forming', 'seyfert', 'liner', 'unclassified'], whan: ['star-forming', 'strong-agn', 'weak-agn', 'retired', 'passive', 'unclassified'],
  },
  x: { nii: [-0.5, -0.3, 0.1, 0.2, null], sii: [-0.4, -0.3, 0, 0.1, null], oi: [-1.5, -1.2, -0.5, -0.3, null] },
  y: [-0.2, 0.1, 0.8, 0.2, null], xErr: { nii: [], sii: [], oi: [] }, yErr: [],
  xLimit: { nii: [], sii: [], oi: [] }, yLimit: [], ewHalpha: [20, 10, 8, 2, null],
}

function mountTable(selection: number[] | null) {
  return mount(SelectionTable, {
    props: { projectId: 'p1', arrays: prepareDiagramArrays(columns), selection },
    global: { plugins: [createVuetify()], stubs: { RouterLink: RouterLinkStub } },
  })
}

describe('SelectionTable', () => {
  it('lists one row per selected galaxy with its ID and a link to it', () => {
    const w = mountTable([1, 3])
    const rows = w.findAll('[data-testid="selection-row"]')
    expect(rows).toHaveLength(2)
    expect(rows[0].text()).toContain('LNS-2')
    expect(rows[1].text()).toContain('LNS-4')
    expect(rows[1].text()).toContain('LINER')
    expect(w.findAllComponents(RouterLinkStub)[0].props('to')).toBe('/projects/p1/galaxies/LNS-2')
  })

  it('explains how to select when nothing is selected', () => {
    const w = mountTable(null)
    expect(w.findAll('[data-testid="selection-row"]')).toHaveLength(0)
    expect(w.text()).toMatch(/Drag a box or a lasso/)
  })

  it('sorts by a column on click, missing values last, and back again', async () => {
    const w = mountTable([0, 1, 2, 3, 4])
    const ids = () => w.findAll('[data-testid="selection-row"]').map((r) => r.find('a, .router-link-stub').text() || r.text().split(' ')[0])
    await w.get('[data-testid="selection-sort-oiiiHb"]').trigger('click')
    expect(ids()[0]).toContain('LNS-1') // y = −0.2 is the smallest
    expect(ids()[4]).toContain('LNS-5') // no value: last
    await w.get('[data-testid="selection-sort-oiiiHb"]').trigger('click')
    expect(ids()[0]).toContain('LNS-3') // 0.8, descending
    expect(ids()[4]).toContain('LNS-5') // still last
    expect(w.get('th[aria-sort="descending"]').text()).toContain('[O III]')
  })
})

describe('SelectionTable with a large selection', () => {
  it('builds only the rows in view, however many are selected', () => {
    const big = 50_000
    const cols: DiagramColumns = { ...columns, count: big, ids: Array.from({ length: big }, (_, i) => `G-${i}`),
      redshift: [], class: { overall: [], nii: [], sii: [], oi: [], whan: [] }, x: { nii: [], sii: [], oi: [] }, y: [], ewHalpha: [] }
    const w = mount(SelectionTable, {
      props: { projectId: 'p1', arrays: prepareDiagramArrays(cols), selection: Array.from({ length: big }, (_, i) => i) },
      global: { plugins: [createVuetify()], stubs: { RouterLink: RouterLinkStub } },
    })
    const rows = w.findAll('[data-testid="selection-row"]')
    // 420 px of 36 px rows plus the overscan of 6 below the view
    expect(rows.length).toBeGreaterThan(10)
    expect(rows.length).toBeLessThan(30)
    expect(w.text()).toMatch(/50\D?000 galaxies selected/)
  })
})
