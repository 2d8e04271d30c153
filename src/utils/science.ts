/**
 * The dashboard's single doorway to the shared science library (the same code the server runs).
 * Screens use the shapes declared here; if the library's shapes change, only this file follows.
 */
import {
  DEFAULT_SETTINGS, defaultRvFor, demarcationCurves, diagnoseGalaxy as diagnoseWithLibrary, reddeningVector, siiRatioCurve, whanLines,
  type DiagnosticSettings, type ExtinctionLaw, type GalaxyInput, type GalaxyResult,
} from '../../shared/science.ts'
import { curveTag, type BptDiagram, type DemarcationKey } from '../../shared/vocabulary/index.ts'

export type RatioDiagram = BptDiagram
export type { ExtinctionLaw }

/** A line drawn on a diagram, in the diagram's own coordinates (WHAN: x = log [N II]/Hα, y = EW(Hα) in Å). */
export interface DiagramLine { id: string; label: string; short: string; x: number[]; y: number[]; dash: 'solid' | 'dash' | 'dot' }

// how each curve is drawn; the tag written on the plot is the vocabulary's, the paper the hover text
const CURVE_DASH: Record<DemarcationKey, DiagramLine['dash']> = { ka03: 'solid', ke01: 'dash', ke06: 'dot', s07: 'dot' }
const WHAN_STYLE: Record<string, { short: string; dash: DiagramLine['dash'] }> = {
  'sf-agn': { short: '', dash: 'solid' },
  'strong-weak-agn': { short: '', dash: 'dash' },
  retired: { short: '3 Å', dash: 'dot' },
  passive: { short: '0.5 Å', dash: 'dot' },
}

export function curvesFor(diagram: RatioDiagram): DiagramLine[] {
  return demarcationCurves(diagram).map((c) => ({
    id: c.key, label: c.label, x: c.x, y: c.y, short: curveTag(c.key), dash: CURVE_DASH[c.key] ?? 'solid',
  }))
}

export function whanDiagramLines(): DiagramLine[] {
  return whanLines().map((l) => ({
    id: l.key, label: `WHAN ${l.label}`, x: l.x, y: l.y, short: WHAN_STYLE[l.key]?.short ?? '', dash: WHAN_STYLE[l.key]?.dash ?? 'solid',
  }))
}

/** Where E(B−V) = `ebv` of foreground dust moves an observed point on a diagram, in dex. */
export function reddeningShift(diagram: RatioDiagram, law: ExtinctionLaw = 'ccm89', rv?: number, ebv = 1): { dx: number; dy: number } {
  return reddeningVector(law, rv ?? defaultRvFor(law), ebv)[diagram]
}

/** [S II] 6717/6731 against n_e (cm⁻³) at the given temperature (K). */
export function siiDensityCurve(temperatureK = 10000): { ne: number[]; ratio: number[] } {
  return siiRatioCurve(temperatureK)
}

/** Settings as the Calculator holds them: any subset; the library's defaults fill the rest. */
export interface PartialSettings { extinctionLaw?: ExtinctionLaw; rv?: number; intrinsicBalmer?: number; minSnr?: number }

export function completeSettings(s: PartialSettings): DiagnosticSettings {
  const law = s.extinctionLaw ?? DEFAULT_SETTINGS.extinctionLaw
  return { ...DEFAULT_SETTINGS, ...s, extinctionLaw: law, rv: s.rv ?? defaultRvFor(law) }
}

/** One galaxy diagnosed in the browser with the same library the server uses. */
export function diagnoseGalaxy(galaxy: GalaxyInput, settings: PartialSettings): GalaxyResult {
  return diagnoseWithLibrary(galaxy, completeSettings(settings))
}

export type { GalaxyInput }
