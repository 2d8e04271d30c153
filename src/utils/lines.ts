import type { LineId } from '../api/types'

/** Display names of the contract's line identifiers. */
export const LINE_LABELS: Record<LineId, string> = {
  halpha: 'Hα 6563',
  hbeta: 'Hβ 4861',
  hgamma: 'Hγ 4340',
  hdelta: 'Hδ 4102',
  oiii_5007: '[O III] 5007',
  oiii_4959: '[O III] 4959',
  oiii_4363: '[O III] 4363',
  nii_6584: '[N II] 6584',
  nii_6548: '[N II] 6548',
  nii_5755: '[N II] 5755',
  sii_6717: '[S II] 6717',
  sii_6731: '[S II] 6731',
  oi_6300: '[O I] 6300',
  oii_3726: '[O II] 3726',
  oii_3729: '[O II] 3729',
  halpha_broad: 'Hα broad',
}

export function lineLabel(id: string): string {
  return (LINE_LABELS as Record<string, string>)[id] ?? id
}

export const RATIO_LABELS: Record<string, string> = {
  niiHa: 'log [N II]/Hα',
  oiiiHb: 'log [O III]/Hβ',
  siiHa: 'log [S II]/Hα',
  oiHa: 'log [O I]/Hα',
  siiDoublet: '[S II] 6717/6731',
  oiiDoublet: '[O II] 3729/3726',
}
