/** Small invented galaxies for API tests (values only need to be physically sensible). */
export function galaxy(id: string, over: Record<string, unknown> = {}) {
  return {
    id, redshift: 0.05, fluxUnit: 1e-17,
    lines: {
      halpha: { flux: 300, error: 6 }, hbeta: { flux: 80, error: 3 }, nii_6584: { flux: 60, error: 3 },
      oiii_5007: { flux: 50, error: 3 }, sii_6717: { flux: 40, error: 2 }, sii_6731: { flux: 30, error: 2 }, oi_6300: { flux: 6, error: 1 },
    },
    ew: { halpha: 24.5, nii_6584: 5 },
    ...over,
  }
}

/** A Seyfert-like nucleus: strong [O III] and [N II] against the Balmer lines. */
export function seyfert(id: string) {
  return galaxy(id, {
    lines: {
      halpha: { flux: 300, error: 6 }, hbeta: { flux: 90, error: 3 }, nii_6584: { flux: 330, error: 6 },
      oiii_5007: { flux: 800, error: 10 }, sii_6717: { flux: 110, error: 4 }, sii_6731: { flux: 100, error: 4 }, oi_6300: { flux: 60, error: 3 },
    },
  })
}
