import type { Config, Data, Layout } from 'plotly.js-dist-min'
import type { DiagramKey } from '../../api/types'
import type { PlotlyModule } from '../../utils/plotly'
import type { ExtinctionLaw } from '../../utils/science'
import { baseLayout, lineAnnotations, lineTraces, PLOT_CONFIG, reddeningAnnotation } from './diagram-layout'

/**
 * What plotly draws of a sample panel: the frame only. It does not change with the data, so a new
 * sample redraws pixels (point-layers.ts) and nothing else.
 */

export interface FrameLabels {
  showReddening: boolean
  law?: ExtinctionLaw
  rv?: number
}

/** Line labels, and the reddening arrow when it is switched on: all that changes with the extinction law. */
export function sampleAnnotations(kind: DiagramKey, dark: boolean, o: FrameLabels) {
  return [
    ...lineAnnotations(kind, dark),
    ...(o.showReddening ? reddeningAnnotation(kind, dark, o.law, o.rv) : []),
  ]
}

export function sampleLayout(kind: DiagramKey, dark: boolean, o: FrameLabels): Partial<Layout> {
  const l = baseLayout(kind, dark)
  l.annotations = sampleAnnotations(kind, dark, o)
  l.title = { text: '' } // the panel's heading is HTML (with the count), above the frame
  l.uirevision = kind // keep the user's zoom across redraws and reloads
  l.hovermode = false // points are hovered by the panel, not by plotly
  // fixed margins: automatic ones cost plotly a second layout pass per panel, and the tick labels are known
  l.margin = { l: 62, r: 14, t: 30, b: 48 }
  l.xaxis = { ...l.xaxis, automargin: false }
  l.yaxis = { ...l.yaxis, automargin: false }
  return l
}

export function sampleTraces(kind: DiagramKey, dark: boolean): Data[] {
  return lineTraces(kind, dark).map((t) => ({ ...t, hoverinfo: 'skip' as const }))
}

/**
 * The whole mode bar is named here: plotly offers box and lasso only for its own marker traces,
 * and its image button would leave out the points, which are ours (`savePng` composes the image).
 */
export function sampleConfig(Plotly: PlotlyModule | null, savePng: () => void): Partial<Config> {
  const camera = (Plotly as unknown as { Icons?: Record<string, unknown> } | null)?.Icons?.camera
  return {
    ...PLOT_CONFIG,
    modeBarButtons: [[
      'select2d', 'lasso2d', 'zoom2d', 'pan2d', 'zoomIn2d', 'zoomOut2d', 'resetScale2d',
      { name: 'savePng', title: 'Save this diagram as PNG', icon: camera, click: savePng },
    ]],
  } as never
}
