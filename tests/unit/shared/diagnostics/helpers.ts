import { DEFAULT_SETTINGS } from '../../../../shared/diagnostics/settings.ts'
import type { DiagnosticSettings, GalaxyInput, LineId } from '../../../../shared/diagnostics/types.ts'

/** Settings = defaults with overrides. */
export function settingsWith(over: Partial<DiagnosticSettings> = {}): DiagnosticSettings {
  return { ...DEFAULT_SETTINGS, ...over }
}

/** A galaxy with every flux given at the stated S/N (error = flux/snr). Invented numbers. */
export function galaxy(id: string, fluxes: Partial<Record<LineId, number>>, snr = 50, extra: Partial<GalaxyInput> = {}): GalaxyInput {
  const lines: GalaxyInput['lines'] = {}
  for (const [k, v] of Object.entries(fluxes)) lines[k as LineId] = { flux: v as number, error: (v as number) / snr }
  return { id, lines, ...extra }
}

/**
 * Fluxes that put a galaxy at log([N II]/Hα) = x, log([O III]/Hβ) = y, log([S II]/Hα) = xs,
 * log([O I]/Hα) = xo with Hα/Hβ = decrement. Hβ = 100.
 */
export function fluxesAt(x: number, y: number, xs: number, xo: number, decrement = 2.86): Partial<Record<LineId, number>> {
  const hb = 100
  const ha = hb * decrement
  const sii = ha * Math.pow(10, xs)
  return {
    halpha: ha, hbeta: hb, nii_6584: ha * Math.pow(10, x), oiii_5007: hb * Math.pow(10, y),
    sii_6717: 0.55 * sii, sii_6731: 0.45 * sii, oi_6300: ha * Math.pow(10, xo),
  }
}
