import { createRng } from '../../shared/stats/rng.ts'
import { LINES } from '../../shared/vocabulary/lines.ts'
import { SPEED_OF_LIGHT_KM_PER_S as C } from '../../shared/diagnostics/luminosity.ts'
import yazl from 'yazl'

/**
 * Invented 1-D spectra for API tests: a flat continuum with Gaussian emission lines of known flux
 * at a known redshift (air wavelengths), seeded Gaussian noise of a known σ per pixel.
 */
export interface Synthetic {
  redshift: number
  /** line fluxes in flux units × Å (line id → flux) */
  lines: Record<string, number>
  sigmaKmPerS?: number
  continuum?: number
  noise?: number
  seed?: number
  /** rest-frame range and step, Å */
  from?: number
  to?: number
  step?: number
}

export function syntheticSpectrum(s: Synthetic) {
  const { redshift: z, sigmaKmPerS = 120, continuum = 10, noise = 0.2, seed = 7, from = 4700, to = 6800, step = 1 } = s
  const rng = createRng(seed)
  const wavelength: number[] = [], flux: number[] = [], error: number[] = []
  for (let rest = from; rest <= to; rest += step) {
    const w = rest * (1 + z)
    let f = continuum
    for (const [id, F] of Object.entries(s.lines)) {
      const c = LINES.find((l) => l.id === id)!.airAngstrom * (1 + z)
      const sa = (c * sigmaKmPerS) / C
      f += (F / (sa * Math.sqrt(2 * Math.PI))) * Math.exp(-0.5 * ((w - c) / sa) ** 2)
    }
    wavelength.push(w)
    flux.push(f + noise * rng.nextNormal())
    error.push(noise)
  }
  return { wavelength, flux, error }
}

/** The spectrum as a CSV table with a header (wavelength, flux, error). */
export function syntheticCsv(s: Synthetic, header = 'wavelength,flux,error'): string {
  const sp = syntheticSpectrum(s)
  return [header, ...sp.wavelength.map((w, i) => `${w.toFixed(3)},${sp.flux[i]!.toFixed(5)},${sp.error[i]}`)].join('\n') + '\n'
}

/** A star-forming nucleus (below the Kauffmann et al. 2003 curve on the [N II] diagram). */
export const STAR_FORMING = { halpha: 600, nii_6584: 150, nii_6548: 50, hbeta: 210, oiii_5007: 90, oiii_4959: 30, sii_6717: 80, sii_6731: 60, oi_6300: 12 }

/** A zip archive of the given entries (name → content). */
export async function zipOf(entries: Array<[string, string | Buffer]>): Promise<Buffer> {
  const zip = new yazl.ZipFile()
  for (const [name, content] of entries) zip.addBuffer(Buffer.isBuffer(content) ? content : Buffer.from(content), name)
  zip.end()
  const chunks: Buffer[] = []
  for await (const c of zip.outputStream) chunks.push(c as Buffer)
  return Buffer.concat(chunks)
}

/** A small valid spectrum object for POST /spectra/fit: Hα and [N II] only, rest 6480–6650 Å. */
export function tinySpectrum(id = 'S-TINY') {
  return { id, redshift: 0.01, fluxUnit: 1e-17, ...syntheticSpectrum({ redshift: 0.01, lines: { halpha: 300, nii_6584: 90 }, from: 6480, to: 6650 }), resolution: { fwhmAngstrom: 2.5 } }
}
