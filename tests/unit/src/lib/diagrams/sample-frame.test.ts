import { describe, expect, it } from 'vitest'
import { sampleAnnotations, sampleConfig, sampleLayout, sampleTraces } from '../../../../../src/lib/diagrams/sample-frame'
import type { PlotlyModule } from '../../../../../src/utils/plotly'

// The frame plotly draws for a sample panel: settings of the panel itself (common practice), the
// lines and arrow come from diagram-layout.ts and are checked with the science library.

describe('sample panel frame', () => {
  it('draws no title, no hover and fixed margins, and keeps the zoom per diagram', () => {
    const l = sampleLayout('nii', false, { showReddening: false })
    expect(l.title).toEqual({ text: '' })
    expect(l.hovermode).toBe(false)
    expect(l.uirevision).toBe('nii')
    expect(l.margin).toEqual({ l: 62, r: 14, t: 30, b: 48 })
    expect(l.xaxis!.automargin).toBe(false)
    expect(l.yaxis!.automargin).toBe(false)
    expect(l.yaxis!.range).toEqual([-1.5, 1.6])
  })

  it('adds the reddening arrow and its label only when it is switched on', () => {
    const without = sampleAnnotations('nii', false, { showReddening: false })
    const withArrow = sampleAnnotations('nii', false, { showReddening: true })
    expect(withArrow.length).toBe(without.length + 2)
    // the WHAN diagram has no reddening arrow
    expect(sampleAnnotations('whan', false, { showReddening: true })).toEqual(sampleAnnotations('whan', false, { showReddening: false }))
  })

  it('leaves hovering to the panel', () => {
    const traces = sampleTraces('nii', false)
    expect(traces.length).toBeGreaterThan(0)
    for (const t of traces) expect((t as { hoverinfo?: string }).hoverinfo).toBe('skip')
  })

  it('names the whole mode bar, with the panel\'s own image button', () => {
    let saved = 0
    const c = sampleConfig({ Icons: { camera: { svg: '<svg/>' } } } as unknown as PlotlyModule, () => { saved++ }) as {
      modeBarButtons: (string | { name: string; icon: unknown; click: () => void })[][]
    }
    const [bar] = c.modeBarButtons
    expect(bar.slice(0, 7)).toEqual(['select2d', 'lasso2d', 'zoom2d', 'pan2d', 'zoomIn2d', 'zoomOut2d', 'resetScale2d'])
    const save = bar[7] as { name: string; icon: unknown; click: () => void }
    expect(save.name).toBe('savePng')
    expect(save.icon).toEqual({ svg: '<svg/>' })
    save.click()
    expect(saved).toBe(1)
  })
})
