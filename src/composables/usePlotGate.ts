import { inject, onBeforeUnmount, provide, type InjectionKey } from 'vue'

/**
 * Which plot of a screen draws first. The Galaxy screen's small plots (its position on the four
 * diagrams, the density curve) cost about half a second of plotly work together; drawn while the
 * spectrum arrives they hold its view back by as much. The screen opens a gate once the spectrum
 * view has been painted (or there is none to draw); the small plots wait for it, but never longer
 * than `timeoutMs`. A plot outside such a screen (the Calculator) finds no gate and draws at once.
 */
export interface PlotGate {
  /** lets the waiting plots draw (idempotent) */
  open: () => void
  /** resolves once the gate is open */
  opened: () => Promise<void>
}

const GATE: InjectionKey<PlotGate> = Symbol('plot-gate')

export function createPlotGate(timeoutMs: number): PlotGate {
  let release!: () => void
  const done = new Promise<void>((ok) => { release = ok })
  const timer = setTimeout(() => release(), timeoutMs)
  return {
    open: () => { clearTimeout(timer); release() },
    opened: () => done,
  }
}

/** The screen's side: a gate for the plots under it, opened on unmount at the latest. */
export function provideImportantPlot(timeoutMs = 3000): PlotGate {
  const gate = createPlotGate(timeoutMs)
  provide(GATE, gate)
  onBeforeUnmount(gate.open)
  return gate
}

/** A secondary plot's side: resolves when it may draw (at once when no screen holds a gate). */
export function useSecondaryPlot(): () => Promise<void> {
  const gate = inject(GATE, null)
  return () => gate?.opened() ?? Promise.resolve()
}
