import type { LocationQuery, LocationQueryRaw } from 'vue-router'
import { isExtinctionLaw, LINE_IDS, type ExtinctionLaw, type LineId } from '../../shared/vocabulary/index.ts'
import type { GalaxyInput, PartialSettings } from '../utils/science'

/**
 * The Calculator's inputs and their link form. Each line is one query key: `halpha=300,6` for a
 * measurement with its error, `oiii_5007=<9` for an upper limit; `z`, `ew_<line>`, `fwhm_broad`,
 * `law`, `rv`, `balmer`, `snr` for the rest. Short keys keep shared links readable.
 */
export interface LineEntry { flux: string; error: string; limit: boolean }

export interface CalculatorState {
  id: string
  redshift: string
  lines: Record<LineId, LineEntry>
  ewHalpha: string
  ewNii: string
  fwhmBroad: string
  law: ExtinctionLaw
  rv: string
  intrinsicBalmer: string
  minSnr: string
  /** erg s⁻¹ cm⁻² per typed flux unit; only luminosities depend on it */
  fluxUnit: string
}

export function emptyState(): CalculatorState {
  const lines = {} as Record<LineId, LineEntry>
  for (const id of LINE_IDS) lines[id] = { flux: '', error: '', limit: false }
  return { id: 'my-galaxy', redshift: '', lines, ewHalpha: '', ewNii: '', fwhmBroad: '', law: 'ccm89', rv: '', intrinsicBalmer: '', minSnr: '', fluxUnit: '1e-17' }
}

/** A star-forming example, so the page shows something useful before anyone types. */
export function exampleState(): CalculatorState {
  const s = emptyState()
  s.id = 'LNS-example'
  s.redshift = '0.05'
  const set = (id: LineId, flux: string, error: string) => { s.lines[id] = { flux, error, limit: false } }
  set('halpha', '300', '6'); set('hbeta', '80', '3'); set('oiii_5007', '60', '3'); set('nii_6584', '75', '3')
  set('sii_6717', '40', '2'); set('sii_6731', '30', '2'); set('oi_6300', '8', '1.5')
  s.ewHalpha = '24.5'
  return s
}

const str = (v: unknown) => (typeof v === 'string' ? v : Array.isArray(v) && typeof v[0] === 'string' ? v[0] : undefined)

export function stateFromQuery(q: LocationQuery): CalculatorState | null {
  const hasAny = LINE_IDS.some((id) => str(q[id]) !== undefined)
  if (!hasAny) return null
  const s = emptyState()
  for (const id of LINE_IDS) {
    const v = str(q[id])
    if (v === undefined) continue
    if (v.startsWith('<')) s.lines[id] = { flux: v.slice(1), error: '', limit: true }
    else {
      const [flux, error] = v.split(',')
      s.lines[id] = { flux: flux ?? '', error: error ?? '', limit: false }
    }
  }
  s.id = str(q.id) ?? s.id
  s.redshift = str(q.z) ?? ''
  s.ewHalpha = str(q.ew_halpha) ?? ''
  s.ewNii = str(q.ew_nii) ?? ''
  s.fwhmBroad = str(q.fwhm_broad) ?? ''
  const law = str(q.law)
  if (law && isExtinctionLaw(law)) s.law = law
  s.rv = str(q.rv) ?? ''
  s.intrinsicBalmer = str(q.balmer) ?? ''
  s.minSnr = str(q.snr) ?? ''
  s.fluxUnit = str(q.unit) ?? s.fluxUnit
  return s
}

export function queryFromState(s: CalculatorState): LocationQueryRaw {
  const q: LocationQueryRaw = {}
  if (s.id) q.id = s.id
  if (s.redshift) q.z = s.redshift
  for (const id of LINE_IDS) {
    const l = s.lines[id]
    if (!l.flux) continue
    q[id] = l.limit ? `<${l.flux}` : l.error ? `${l.flux},${l.error}` : l.flux
  }
  if (s.ewHalpha) q.ew_halpha = s.ewHalpha
  if (s.ewNii) q.ew_nii = s.ewNii
  if (s.fwhmBroad) q.fwhm_broad = s.fwhmBroad
  if (s.law !== 'ccm89') q.law = s.law
  if (s.rv) q.rv = s.rv
  if (s.intrinsicBalmer) q.balmer = s.intrinsicBalmer
  if (s.minSnr) q.snr = s.minSnr
  if (s.fluxUnit !== '1e-17') q.unit = s.fluxUnit
  return q
}

export interface BuiltInput {
  galaxy: GalaxyInput
  settings: PartialSettings & { extinctionLaw: ExtinctionLaw }
  /** inputs that are not numbers yet, by field, so the form can mark them */
  invalid: Record<string, string>
}

/** The galaxy in the API's input shape (openapi/openapi.json), or the fields that still need fixing. */
export function buildInput(s: CalculatorState): BuiltInput {
  const invalid: Record<string, string> = {}
  const num = (v: string, field: string, positive = false): number | undefined => {
    if (v.trim() === '') return undefined
    const n = Number(v)
    if (!Number.isFinite(n)) { invalid[field] = 'not a number'; return undefined }
    if (positive && n <= 0) { invalid[field] = 'must be above 0'; return undefined }
    return n
  }
  const lines: GalaxyInput['lines'] = {}
  for (const id of LINE_IDS) {
    const l = s.lines[id]
    if (l.flux.trim() === '') continue
    if (l.limit) {
      const u = num(l.flux, `${id}.flux`, true)
      if (u !== undefined) lines[id] = { upperLimit: u }
      continue
    }
    const flux = num(l.flux, `${id}.flux`)
    const error = num(l.error, `${id}.error`, true)
    if (flux !== undefined && error === undefined && !invalid[`${id}.error`]) invalid[`${id}.error`] = 'an error is needed'
    if (flux !== undefined && error !== undefined) lines[id] = { flux, error }
  }
  const ew: NonNullable<GalaxyInput['ew']> = {}
  const ewH = num(s.ewHalpha, 'ewHalpha')
  const ewN = num(s.ewNii, 'ewNii')
  if (ewH !== undefined) ew.halpha = ewH
  if (ewN !== undefined) ew.nii_6584 = ewN
  const fwhm = num(s.fwhmBroad, 'fwhmBroad', true)
  const galaxy: GalaxyInput = { id: s.id || 'galaxy', lines }
  const z = num(s.redshift, 'redshift')
  if (z !== undefined) galaxy.redshift = z
  const unit = num(s.fluxUnit, 'fluxUnit', true)
  if (unit !== undefined) galaxy.fluxUnit = unit
  if (Object.keys(ew).length) galaxy.ew = ew
  if (fwhm !== undefined) galaxy.fwhm = { halpha_broad: fwhm }
  const settings: BuiltInput['settings'] = { extinctionLaw: s.law }
  const rv = num(s.rv, 'rv', true)
  const balmer = num(s.intrinsicBalmer, 'intrinsicBalmer', true)
  const snr = num(s.minSnr, 'minSnr')
  if (rv !== undefined) settings.rv = rv
  if (balmer !== undefined) settings.intrinsicBalmer = balmer
  if (snr !== undefined) settings.minSnr = snr
  return { galaxy, settings, invalid }
}
