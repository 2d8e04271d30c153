import { onBeforeUnmount } from 'vue'

/** Resolves once the element's width has stayed the same for one frame (at most six frames). */
export async function widthSettled(node: HTMLElement) {
  // its width now (a layout the coming frame needs anyway): an element mounted into a settled page draws a frame sooner
  let last = node.clientWidth
  for (let i = 0; i < 6; i++) {
    await new Promise((done) => requestAnimationFrame(done))
    const w = node.clientWidth
    if (w === last) return
    last = w
  }
}

/**
 * Calls `settled` once the observed element has stopped changing size for `quietMs`. The observer
 * reports once on observe (nothing changed yet) and then in bursts while a window is dragged; each
 * resize of a plot is a full relayout, so the first report is skipped and the rest coalesced.
 */
export function useResizeSettled(settled: () => void | Promise<void>, quietMs = 120) {
  let observer: ResizeObserver | null = null
  let timer: ReturnType<typeof setTimeout> | null = null

  function observe(node: HTMLElement) {
    let first = true
    observer = new ResizeObserver(() => {
      if (first) { first = false; return }
      if (timer) clearTimeout(timer)
      timer = setTimeout(() => { void settled() }, quietMs)
    })
    observer.observe(node)
  }

  onBeforeUnmount(() => {
    observer?.disconnect()
    if (timer) clearTimeout(timer)
  })

  return { observe }
}
