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
  return { log, wrapper, queue: () => queue }
}
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
})
