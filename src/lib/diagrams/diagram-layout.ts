import type { Annotation, Config, Data, Layout } from 'plotly.js-dist-min'
import type { DiagramKey } from '../../api/types'
import { curvesFor, reddeningShift, whanDiagramLines, type DiagramLine, type ExtinctionLaw } from '../../utils/science'
import { diagramLabel, ratioDefinition } from '../../../shared/vocabulary/index.ts'

/** Axis titles, ranges and line styles of the four diagrams, shared by the sample and single-galaxy plots. */
export interface DiagramSpec {
  key: DiagramKey
  title: string
  xTitle: string
  yTitle: string
  xRange: [number, number]
  /** for WHAN the y axis is logarithmic, so the range is in log10(EW) */
  yRange: [number, number]
  yLog: boolean
}

export const DIAGRAM_SPECS: Record<DiagramKey, DiagramSpec> = {
  nii: { key: 'nii', title: diagramLabel('nii'), xTitle: ratioDefinition('niiHa'), yTitle: ratioDefinition('oiiiHb'), xRange: [-2.1, 1.0], yRange: [-1.5, 1.6], yLog: false },
  sii: { key: 'sii', title: diagramLabel('sii'), xTitle: ratioDefinition('siiHa'), yTitle: ratioDefinition('oiiiHb'), xRange: [-1.6, 0.9], yRange: [-1.5, 1.6], yLog: false },
  oi: { key: 'oi', title: diagramLabel('oi'), xTitle: ratioDefinition('oiHa'), yTitle: ratioDefinition('oiiiHb'), xRange: [-2.8, 0.4], yRange: [-1.5, 1.6], yLog: false },
  whan: { key: 'whan', title: diagramLabel('whan'), xTitle: ratioDefinition('niiHa'), yTitle: 'EW(Hα) (Å)', xRange: [-2.1, 1.0], yRange: [-1, 3], yLog: true },
}

const LINE_COLOURS = ['#2B2B2B', '#4A4A4A', '#6E6E6E']

export function linesFor(key: DiagramKey): DiagramLine[] {
  try {
    return key === 'whan' ? whanDiagramLines() : curvesFor(key)
  } catch {
    // a diagram without its lines is still worth showing; the panel notes the absence
    return []
  }
}

/** Line traces (SVG scatter, drawn above the point layer so they stay crisp). */
export function lineTraces(key: DiagramKey, dark: boolean): Data[] {
  const base = dark ? ['#E0E0E0', '#BDBDBD', '#9E9E9E'] : LINE_COLOURS
  return linesFor(key).map((l, i) => ({
    type: 'scatter',
    mode: 'lines',
    x: l.x,
    y: l.y,
    name: l.label,
    hoverinfo: 'name',
    showlegend: false,
    line: { color: base[Math.min(i, base.length - 1)], width: 1.6, dash: l.dash },
  }) as Data)
}

/** Line labels written at the line ends so a printed figure still says which is which. */
export function lineAnnotations(key: DiagramKey, dark: boolean): Partial<Annotation>[] {
  const spec = DIAGRAM_SPECS[key]
  return linesFor(key).filter((l) => l.short).flatMap((l) => {
    // label at the last point still inside the plotted box
    for (let i = l.x.length - 1; i >= 0; i--) {
      const x = l.x[i]
      const y = spec.yLog ? Math.log10(l.y[i]) : l.y[i]
      if (x >= spec.xRange[0] && x <= spec.xRange[1] && y >= spec.yRange[0] && y <= spec.yRange[1]) {
        // labels near the right or top edge are written inwards so they are not clipped
        const nearRight = x > spec.xRange[1] - 0.2 * (spec.xRange[1] - spec.xRange[0])
        const nearTop = y > spec.yRange[1] - 0.1 * (spec.yRange[1] - spec.yRange[0])
        return [{
          // on a log axis plotly places annotations by log10 of the value
          x, y: spec.yLog ? y : l.y[i], text: l.short, showarrow: false, xanchor: nearRight ? 'right' : 'left', yanchor: nearTop ? 'top' : 'bottom',
          font: { size: 10, color: dark ? '#CFCFCF' : '#444' },
        } as Partial<Annotation>]
      }
    }
    return []
  })
}

/** The reddening arrow: where one magnitude of E(B−V) would move an observed point. */
export function reddeningAnnotation(key: DiagramKey, dark: boolean, law?: ExtinctionLaw, rv?: number): Partial<Annotation>[] {
  if (key === 'whan') return []
  let shift: { dx: number; dy: number }
  try { shift = reddeningShift(key, law, rv, 1) } catch { return [] }
  const spec = DIAGRAM_SPECS[key]
  // anchor in the lower-left corner, clear of the star-forming sequence
  const x0 = spec.xRange[0] + 0.12 * (spec.xRange[1] - spec.xRange[0])
  const y0 = spec.yRange[0] + 0.12 * (spec.yRange[1] - spec.yRange[0])
  // the shifts are small (a few hundredths of a dex), so the arrow is drawn ×5 and says so
  const scale = 5
  const colour = dark ? '#F2C14E' : '#8A5A00'
  return [{
    x: x0 + scale * shift.dx, y: y0 + scale * shift.dy, ax: x0, ay: y0, xref: 'x', yref: 'y', axref: 'x', ayref: 'y',
    showarrow: true, arrowhead: 2, arrowsize: 1, arrowwidth: 1.6, arrowcolor: colour, text: '',
  }, {
    x: x0, y: y0, xref: 'x', yref: 'y', text: `E(B−V) = ${scale} mag`, showarrow: false, yanchor: 'top', xanchor: 'left',
    font: { size: 10, color: colour },
  }]
}

export function baseLayout(key: DiagramKey, dark: boolean): Partial<Layout> {
  const spec = DIAGRAM_SPECS[key]
  const fg = dark ? '#E3E6EC' : '#1D2330'
  const grid = dark ? 'rgba(255,255,255,0.08)' : 'rgba(0,0,0,0.07)'
  const axis = { gridcolor: grid, zeroline: false, linecolor: fg, mirror: true, ticks: 'outside' as const, color: fg, automargin: true }
  return {
    margin: { l: 56, r: 14, t: 30, b: 46 },
    paper_bgcolor: 'rgba(0,0,0,0)',
    plot_bgcolor: 'rgba(0,0,0,0)',
    font: { family: 'Roboto, sans-serif', size: 12, color: fg },
    title: { text: spec.title, font: { size: 14 }, x: 0.02, xanchor: 'left', y: 0.98 },
    xaxis: { ...axis, title: { text: spec.xTitle }, range: [...spec.xRange] },
    yaxis: { ...axis, title: { text: spec.yTitle }, range: [...spec.yRange], type: spec.yLog ? 'log' : 'linear', ...(spec.yLog ? { dtick: 1 } : {}) },
    dragmode: 'select',
    hovermode: 'closest',
    showlegend: false,
    hoverlabel: { font: { family: 'Roboto Mono, monospace', size: 12 } },
  }
}

/** No link to any outside service, no logo; the image button saves locally. */
export const PLOT_CONFIG: Partial<Config> = {
  displaylogo: false,
  responsive: true,
  showSendToCloud: false,
  modeBarButtonsToRemove: ['autoScale2d', 'toggleSpikelines', 'hoverCompareCartesian', 'hoverClosestCartesian'],
  toImageButtonOptions: { format: 'png', filename: 'ratiograph-diagram', scale: 2 },
}
