import { describe, expect, it } from 'vitest'
import { defineComponent, h } from 'vue'
import { mount } from '@vue/test-utils'
import { createPlotGate, provideImportantPlot, useSecondaryPlot, type PlotGate } from '../../../../src/composables/usePlotGate'

// Which plot of a screen draws first (the Galaxy screen's spectrum view before its small plots).

const later = (ms: number) => new Promise((done) => setTimeout(done, ms))
const settled = async (p: Promise<unknown>) => { let done = false; void p.then(() => { done = true }); await later(0); return done }

describe('plot gate', () => {
  it('holds the waiting plots until it is opened', async () => {
    const gate = createPlotGate(10_000)
    const waiting = gate.opened()
    expect(await settled(waiting)).toBe(false)
    gate.open()
    gate.open() // idempotent
    expect(await settled(waiting)).toBe(true)
  })

  it('opens by itself after its time limit, so no plot waits for ever', async () => {
    const gate = createPlotGate(20)
    expect(await settled(gate.opened())).toBe(false)
    await later(40)
    expect(await settled(gate.opened())).toBe(true)
  })

  it('lets a plot under a screen wait, and a plot under none draw at once; unmounting the screen opens it', async () => {
    let gate!: PlotGate
    let mayDraw!: () => Promise<void>
    const Plot = defineComponent({ setup() { mayDraw = useSecondaryPlot(); return () => h('div') } })
    const Screen = defineComponent({ setup() { gate = provideImportantPlot(10_000); return () => h(Plot) } })
    const screen = mount(Screen)
    expect(await settled(mayDraw())).toBe(false)
    screen.unmount()
    expect(await settled(mayDraw())).toBe(true)

    mount(Plot)
    expect(await settled(mayDraw())).toBe(true)
    expect(gate).toBeDefined()
  })
})
