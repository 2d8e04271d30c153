import { onBeforeUnmount } from 'vue'
import type { PlotlyModule } from '../utils/plotly'

/**
 * Plotly calls on one element, one after another, and none once the component is gone: plotly's
 * drawing is asynchronous, and a purge (or a second react) landing in the middle of one leaves it
 * reading a figure that no longer exists. The element is purged after the last call has settled.
 */
export function usePlotQueue(element: () => HTMLElement | undefined, plotly: () => PlotlyModule | null) {
  let chain: Promise<unknown> = Promise.resolve()
  let disposed = false

  function run<T>(op: () => T | Promise<T>): Promise<T | undefined> {
    const next = chain.then(() => (disposed ? undefined : op()))
    chain = next.catch(() => {}) // a failed call must not block the ones after it
    return next
  }

  onBeforeUnmount(() => {
    const gd = element()
    const P = plotly()
    disposed = true
    void chain.then(() => { if (gd && P) P.purge(gd) })
  })

  return { run, isDisposed: () => disposed }
}
