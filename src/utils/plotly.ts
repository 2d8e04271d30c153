/**
 * Plotly, loaded once on demand (1.2 MB: only the screens with plots pay for it). The router starts
 * the load on the way into the Diagrams screen; a panel mounted after it has finished gets the
 * module synchronously and draws its frame at once, without another trip through the task queue.
 */
export type PlotlyModule = typeof import('plotly.js-dist-min').default

let loaded: PlotlyModule | null = null
let loading: Promise<PlotlyModule> | null = null

export function loadPlotly(): Promise<PlotlyModule> {
  loading ??= import('plotly.js-dist-min').then((m) => (loaded = m.default)).catch((e) => { loading = null; throw e })
  return loading
}

/** The module if it has already loaded, else null. */
export function plotlyIfLoaded(): PlotlyModule | null {
  return loaded
}
