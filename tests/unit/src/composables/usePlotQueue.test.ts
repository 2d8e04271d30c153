import { describe, expect, it } from 'vitest'
import { defineComponent, h } from 'vue'
import { mount } from '@vue/test-utils'
import { usePlotQueue } from '../../../../src/composables/usePlotQueue'
import type { PlotlyModule } from '../../../../src/utils/plotly'

// Ordering guarantees of the plot queue (common practice for serialising asynchronous drawing).

function harness() {
  const log: string[] = []
  const gd = document.createElement('div')
  const plotly = { purge: () => { log.push('purge') } } as unknown as PlotlyModule
  let queue!: ReturnType<typeof usePlotQueue>
  const Comp = defineComponent({ setup() { queue = usePlotQueue(() => gd, () => plotly); return () => h('div') } })
  const wrapper = mount(Comp)
  return { log, wrapper, gd, queue: () => queue }
}
/** What plotly's first draw leaves on its element (its relayout reads it and throws without it). */
const drawFigure = (gd: HTMLElement) => { (gd as unknown as { _fullLayout: object })._fullLayout = {} }
const later = (ms: number) => new Promise((done) => setTimeout(done, ms))

describe('usePlotQueue', () => {
  it('runs calls one after another, even when an earlier one is slower', async () => {
    const { log, queue } = harness()
    const a = queue().run(async () => { await later(20); log.push('a') })
    const b = queue().run(() => { log.push('b') })
    await Promise.all([a, b])
    expect(log).toEqual(['a', 'b'])
  })

  it('keeps going after a failed call', async () => {
    const { log, queue } = harness()
    await expect(queue().run(() => { throw new Error('bad figure') })).rejects.toThrow('bad figure')
    await queue().run(() => { log.push('after') })
    expect(log).toEqual(['after'])
  })

  it('purges only after the call in flight has finished, and starts nothing once unmounted', async () => {
    const { log, wrapper, queue } = harness()
    const slow = queue().run(async () => { await later(20); log.push('drawn') })
    await later(0) // the slow call has started
    wrapper.unmount()
    const skipped = queue().run(() => { log.push('too late') })
    await Promise.all([slow, skipped])
    await later(0)
    expect(log).toEqual(['drawn', 'purge'])
    expect(queue().isDisposed()).toBe(true)
  })

  it('drops a change asked for before the first draw (it would throw inside plotly), and runs one queued behind it', async () => {
    const { log, gd, queue } = harness()
    await queue().update(() => { log.push('relayout before any draw') })
    const draw = queue().run(async () => { await later(10); drawFigure(gd); log.push('newPlot') })
    const change = queue().update(() => { log.push('relayout') })
    await Promise.all([draw, change])
    expect(log).toEqual(['newPlot', 'relayout'])
  })

  it('starts no change once unmounted', async () => {
    const { log, gd, wrapper, queue } = harness()
    await queue().run(() => { drawFigure(gd) })
    wrapper.unmount()
    await queue().update(() => { log.push('relayout') })
    await later(0)
    expect(log).toEqual(['purge'])
  })
})
