/**
 * The dashboard's single doorway to the shared science library. Screens use the shapes declared
 * here; if the library's shapes change, only this file follows.
 */
import { demarcationCurves, diagnoseGalaxy, reddeningVector, siiRatioCurve, whanLines } from '../../shared/science.ts'
import type { GalaxyResult } from '../api/types'

export type RatioDiagram = 'nii' | 'sii' | 'oi'

/** A line drawn on a diagram, in the diagram's own coordinates (WHAN: x = log [N II]/Hα, y = EW(Hα) in Å). */
export interface DiagramLine { id: string; label: string; x: number[]; y: number[]; dash?: 'solid' | 'dash' | 'dot' }

export function curvesFor(diagram: RatioDiagram): DiagramLine[] {
  return (demarcationCurves(diagram) as DiagramLine[]).map((c) => ({ ...c }))
}

export function whanDiagramLines(): DiagramLine[] {
  return (whanLines() as DiagramLine[]).map((c) => ({ ...c }))
}

/** Shift of an observed point on a diagram for E(B−V) = `ebv` of foreground dust, in dex. */
export function reddeningShift(diagram: RatioDiagram, ebv = 1): { dx: number; dy: number } {
  return reddeningVector(diagram, ebv) as { dx: number; dy: number }
}

/** [S II] 6717/6731 against n_e (cm⁻³) at the given temperature (K). */
export function siiDensityCurve(temperatureK = 10000): { ne: number[]; ratio: number[] } {
  return siiRatioCurve(temperatureK) as { ne: number[]; ratio: number[] }
}

export { diagnoseGalaxy }
export type CalculatorResult = GalaxyResult
