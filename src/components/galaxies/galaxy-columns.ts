import type { GalaxySummary } from '../../api/types'

/** The columns a galaxies table can show; `sort` names the server's sort field where there is one. */
export interface GalaxyColumn {
  key: string
  title: string
  sort?: string
  numeric?: boolean
  digits?: number
  /** fixed decimals even for tiny values (logarithms) */
  fixed?: boolean
  value: (g: GalaxySummary) => unknown
  kind?: 'class' | 'id' | 'ebv'
  defaultOn?: boolean
}

export const GALAXY_COLUMNS: GalaxyColumn[] = [
  { key: 'id', title: 'Galaxy', sort: 'id', value: (g) => g.id, kind: 'id', defaultOn: true },
  { key: 'redshift', title: 'z', sort: 'redshift', numeric: true, digits: 4, fixed: true, value: (g) => g.redshift, defaultOn: true },
  { key: 'overall', title: 'Overall', sort: 'classOverall', value: (g) => g.classes.overall, kind: 'class', defaultOn: true },
  { key: 'nii', title: '[N II]', value: (g) => g.classes.nii, kind: 'class' },
  { key: 'sii', title: '[S II]', value: (g) => g.classes.sii, kind: 'class' },
  { key: 'oi', title: '[O I]', value: (g) => g.classes.oi, kind: 'class' },
  { key: 'whan', title: 'WHAN', value: (g) => g.classes.whan, kind: 'class', defaultOn: true },
  { key: 'ebv', title: 'E(B−V)', sort: 'ebv', numeric: true, digits: 3, value: (g) => g.ebv, kind: 'ebv', defaultOn: true },
  { key: 'av', title: 'A_V', sort: 'av', numeric: true, digits: 2, value: (g) => g.av },
  { key: 'neSii', title: 'n_e [S II] (cm⁻³)', sort: 'neSii', numeric: true, digits: 0, value: (g) => g.neSii, defaultOn: true },
  { key: 'teOiii', title: 'T_e [O III] (K)', sort: 'teOiii', numeric: true, digits: 0, value: (g) => g.teOiii },
  { key: 'n2Pp04', title: '12+log O/H (N2)', sort: 'n2Pp04', numeric: true, digits: 2, value: (g) => g.n2Pp04, defaultOn: true },
  { key: 'o3n2Pp04', title: '12+log O/H (O3N2)', sort: 'o3n2Pp04', numeric: true, digits: 2, value: (g) => g.o3n2Pp04 },
  { key: 'sfrHalpha', title: 'SFR (M☉/yr)', sort: 'sfrHalpha', numeric: true, digits: 3, value: (g) => g.sfrHalpha, defaultOn: true },
  { key: 'niiHa', title: 'log [N II]/Hα', sort: 'niiHa', numeric: true, digits: 3, fixed: true, value: (g) => g.ratios?.niiHa },
  { key: 'oiiiHb', title: 'log [O III]/Hβ', sort: 'oiiiHb', numeric: true, digits: 3, fixed: true, value: (g) => g.ratios?.oiiiHb },
  { key: 'siiHa', title: 'log [S II]/Hα', sort: 'siiHa', numeric: true, digits: 3, fixed: true, value: (g) => g.ratios?.siiHa },
  { key: 'oiHa', title: 'log [O I]/Hα', sort: 'oiHa', numeric: true, digits: 3, fixed: true, value: (g) => g.ratios?.oiHa },
  { key: 'flagCount', title: 'Flags', sort: 'flagCount', numeric: true, digits: 0, value: (g) => g.flagCount, defaultOn: true },
]

export const DEFAULT_COLUMNS = GALAXY_COLUMNS.filter((c) => c.defaultOn).map((c) => c.key)
