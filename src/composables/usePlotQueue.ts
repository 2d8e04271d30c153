import { onBeforeUnmount } from 'vue'
import { hasFigure } from '../lib/diagrams/plotly-frame'
import type { PlotlyModule } from '../utils/plotly'

/**
 * Plotly calls on one element, one after another, and none once the component is gone: plotly's
 * drawing is asynchronous, and a purge (or a second react) landing in the middle of one leaves it
 * reading a figure that no longer exists. The element is purged after the last call has settled.
 */
export function usePlotQueue(element: () => HTMLElement | undefined, plotly: () => PlotlyModule | null) {
  let chain: Promise<unknown> = Promise.resolve()
  let disposed = false

  /** A call that draws the figure (newPlot, react). */
  function run<T>(op: () => T | Promise<T>): Promise<T | undefined> {
    const next = chain.then(() => (disposed ? undefined : op()))
    chain = next.catch(() => {}) // a failed call must not block the ones after it
    return next
  }

  /**
   * A change to a drawn figure (relayout, resize). Plotly's relayout reads its figure state and
   * throws on an element not yet drawn, so one asked for before the first draw (settings arriving
   * while the panel waits for its width) is dropped: that draw reads the current state anyway.
   */
  function update<T>(op: () => T | Promise<T>): Promise<T | undefined> {
    return run(() => (hasFigure(element()) ? op() : undefined))
  }

  onBeforeUnmount(() => {
    const gd = element()
    const P = plotly()
    disposed = true
    void chain.then(() => { if (gd && P) P.purge(gd) })
  })

  return { run, update, isDisposed: () => disposed }
}
