import type { BroadHalpha, FitComponents, FitProfile, FitSettings } from '../../api/spectra-types'

/** The fit settings: defaults, the choices the forms offer, and a one-line summary. */

/**
 * What a project without `settings.fit` fits with: the defaults of the fit options schema (a unit
 * test holds this equal to `FitOptionsSchema.parse({})`; the schema itself stays out of the bundle).
 */
export const DEFAULT_FIT_SETTINGS: Readonly<FitSettings> = Object.freeze<FitSettings>({
  profile: 'gaussian', components: 1, broadHalpha: 'auto', absorption: ['nad'], monteCarlo: { draws: 0, seed: 1 }, balmerAbsorptionEw: 0,
})

export const PROFILE_CHOICES: { value: FitProfile; title: string }[] = [
  { value: 'gaussian', title: 'Gaussian' },
  { value: 'lorentzian', title: 'Lorentzian' },
  { value: 'voigt', title: 'Voigt' },
]

export const COMPONENT_CHOICES: { value: FitComponents; title: string }[] = [
  { value: 1, title: 'One narrow component' },
  { value: 2, title: 'Two narrow components' },
  { value: 'auto', title: 'One or two, whichever the data prefer' },
]

export const BROAD_HALPHA_CHOICES: { value: BroadHalpha; title: string }[] = [
  { value: 'off', title: 'Off' },
  { value: 'on', title: 'Always fitted' },
  { value: 'auto', title: 'Kept when the data prefer it' },
]

export const ABSORPTION_CHOICES: { value: 'nad'; title: string }[] = [{ value: 'nad', title: 'Na I D 5890,5896' }]

/** Most Monte Carlo draws a fit takes (the schema's bound, held equal by a unit test; the server checks it). */
export const MAX_FIT_DRAWS = 1000
/** Largest Balmer absorption EW the fit options take (Å). */
export const MAX_BALMER_ABSORPTION_EW = 20

/** The fit settings of a project's assumptions, the defaults filled in for what is absent. */
export function fitSettingsOf(settings: { fit?: Partial<FitSettings> | null } | null | undefined): FitSettings {
  const f = settings?.fit ?? {}
  return {
    profile: f.profile ?? DEFAULT_FIT_SETTINGS.profile,
    components: f.components ?? DEFAULT_FIT_SETTINGS.components,
    broadHalpha: f.broadHalpha ?? DEFAULT_FIT_SETTINGS.broadHalpha,
    absorption: [...(f.absorption ?? DEFAULT_FIT_SETTINGS.absorption)],
    monteCarlo: {
      draws: f.monteCarlo?.draws ?? DEFAULT_FIT_SETTINGS.monteCarlo.draws,
      seed: f.monteCarlo?.seed ?? DEFAULT_FIT_SETTINGS.monteCarlo.seed,
    },
    balmerAbsorptionEw: f.balmerAbsorptionEw ?? DEFAULT_FIT_SETTINGS.balmerAbsorptionEw,
  }
}

/** Whether two fit settings fit alike (absorption order does not matter). */
export function sameFitSettings(a: FitSettings, b: FitSettings): boolean {
  return a.profile === b.profile && a.components === b.components && a.broadHalpha === b.broadHalpha
    && [...a.absorption].sort().join() === [...b.absorption].sort().join()
    && a.monteCarlo.draws === b.monteCarlo.draws && a.monteCarlo.seed === b.monteCarlo.seed
    && a.balmerAbsorptionEw === b.balmerAbsorptionEw
}

/** "Gaussian · 1 component · broad Hα auto · Na I D · analytic errors" */
export function describeFitSettings(f: FitSettings): string {
  const profile = PROFILE_CHOICES.find((p) => p.value === f.profile)?.title ?? f.profile
  const comps = f.components === 'auto' ? '1 or 2 components' : `${f.components} component${f.components === 1 ? '' : 's'}`
  const abs = f.absorption.length ? f.absorption.map((a) => (a === 'nad' ? 'Na I D' : a)).join(', ') : 'no absorption'
  const mc = f.monteCarlo.draws > 0 ? `${f.monteCarlo.draws} Monte Carlo draws (seed ${f.monteCarlo.seed})` : 'analytic errors'
  const balmer = f.balmerAbsorptionEw > 0 ? [`Balmer absorption ${f.balmerAbsorptionEw} Å added back`] : []
  return [profile, comps, `broad Hα ${f.broadHalpha}`, abs, ...balmer, mc].join(' · ')
}
