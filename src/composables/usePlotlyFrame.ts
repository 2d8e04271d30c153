import { onMounted, ref, type Ref } from 'vue'
import type { Config, Data, Layout, PlotlyHTMLElement } from 'plotly.js-dist-min'
import { diagramPng, type DiagramPngOptions } from '../lib/diagrams/diagram-png'
import { hasSelectionOutline, readFrame } from '../lib/diagrams/plotly-frame'
import { loadPlotly, plotlyIfLoaded, type PlotlyModule } from '../utils/plotly'
import { usePlotQueue } from './usePlotQueue'
import { useResizeSettled, widthSettled } from './useResizeSettled'

export interface PlotlyFrameOptions {
  /** names the `rg:frame-<name>` performance mark set when the first draw is done */
  name: () => string
  traces: () => Data[]
  layout: () => Partial<Layout>
  config: (Plotly: PlotlyModule) => Partial<Config>
  /** after the first draw, once `ready` is set: wire plotly's events and paint what lies under the frame */
  onReady: (gd: PlotlyHTMLElement) => void
  /** after plotly has followed a resize of the element */
  onResized: () => void
}

/**
 * A plotly frame on `el`: loads plotly, draws once the element's width has settled, follows
 * resizes, and runs later changes through the plot queue (none before the first draw, none after
 * unmount). `frame()` says where plotly put the plotting area and which window it shows.
 */
export function usePlotlyFrame(el: Ref<HTMLElement | undefined>, o: PlotlyFrameOptions) {
  let Plotly: PlotlyModule | null = null
  const plots = usePlotQueue(() => el.value, () => Plotly)
  const ready = ref(false)
  const failed = ref<string | null>(null)
  const resize = useResizeSettled(async () => {
    if (!Plotly || !el.value) return
    const P = Plotly, gd = el.value
    await plots.update(() => P.Plots.resize(gd))
    o.onResized()
  })

  onMounted(async () => {
    try {
      Plotly = plotlyIfLoaded() ?? await loadPlotly()
      // let the app's layout settle first (the project's side navigation takes its width a frame or
      // two after mounting): a frame drawn at a stale width costs a second full layout moments later
      if (el.value) await widthSettled(el.value)
      if (!el.value) return
      const P = Plotly, node = el.value
      await plots.run(() => P.newPlot(node, o.traces(), o.layout(), o.config(P)))
      if (plots.isDisposed()) return
      performance.mark(`rg:frame-${o.name()}`)
      resize.observe(node)
      ready.value = true
      o.onReady(node as PlotlyHTMLElement)
    } catch (e) {
      failed.value = e instanceof Error ? e.message : String(e)
    }
  })

  /** Runs `op` on the drawn figure through the queue; false when plotly is not there yet. */
  async function change(op: (P: PlotlyModule, gd: HTMLElement) => unknown): Promise<boolean> {
    if (!Plotly || !el.value) return false
    const P = Plotly, gd = el.value
    await plots.update(() => op(P, gd))
    return true
  }

  return {
    ready, failed,
    frame: () => readFrame(el.value),
    /** A new frame from traces(), layout() and config(); resolves false when nothing was drawn yet. */
    replot: () => change((P, gd) => P.react(gd, o.traces(), o.layout(), o.config(P))),
    relayout: (update: Partial<Layout>) => change((P, gd) => P.relayout(gd, update as never)),
    /** Removes a box or lasso outline left on the frame. */
    clearOutline: async () => { if (el.value && hasSelectionOutline(el.value)) await change((P, gd) => P.relayout(gd, { selections: [] } as never)) },
    /** The panel as a PNG data URL (see diagramPng), or null when the frame is not drawn. */
    png: async (png: DiagramPngOptions) => (Plotly && el.value ? diagramPng(Plotly, el.value, png) : null),
  }
}
