#!/usr/bin/python3
"""Peer of `npm run bench:spectra`: a plain scipy.optimize.curve_fit of all parameters of the spectrum
model (shared/science/README.md §13.6) on the fit pixels the benchmark writes (the windows and clipped
side bands of shared/spectra/prepare.ts). Run with Debian's /usr/bin/python3 (python3-scipy).

Model per window: c0 + c1 t, t = (lambda - mid)/half, plus one Gaussian per line sharing one velocity v
and intrinsic sigma s (km/s); observed sigma_lambda^2 = (lambda_c s/c)^2 + sigma_inst^2; [O III] 4959
and [N II] 6548 tied to their parents at the fixed ratios. Unlike the TypeScript fit the Gaussians are
evaluated at the pixel centres (no pixel integration): the plain model a user would write. A pixel of
width d averages the profile, which adds d^2/12 to sigma_lambda^2 (about 5 % at the narrowest lines
here, 0.9 A pixels, sigma_lambda >= 1.2 A): the peer's sigma carries that bias, the pull table shows it.
curve_fit(..., sigma=err, absolute_sigma=True, bounds, method='trf'), default tolerances, numerical
Jacobian; start: side-band continua, v = 0, s = 100 km/s, each flux from the continuum-subtracted sum
within +-300 km/s of the line (>= 0).

Arguments: the JSON file, the number of passes (default 1). Prints one JSON line: versions, the seconds
of the fastest pass of fits alone (reading excluded) and of every pass, and per spectrum
(value, error) of Halpha, [O III] 5007, v, s, and the instrumental sigma of Halpha in km/s.
"""
import json
import platform
import sys
import time
import warnings

import numpy as np
import scipy
from scipy.optimize import OptimizeWarning, curve_fit

C = 299792.458


def fit_one(sp):
    lam = np.asarray(sp['lambda'])
    lo = np.asarray(sp['lo'])
    hi = np.asarray(sp['hi'])
    y = np.asarray(sp['y'])
    err = np.asarray(sp['sigma'])
    wins = sp['windows']
    names = []
    p0, lower, upper = [], [], []

    def add(name, start, lo_b, hi_b):
        names.append(name)
        p0.append(start)
        lower.append(lo_b)
        upper.append(hi_b)
        return len(names) - 1

    t = np.empty_like(lam)
    for w in wins:
        sl = slice(w['start'], w['end'])
        t[sl] = (lam[sl] - w['mid']) / w['half']
        w['i0'] = add(w['id'] + '.c0', w['c0'], -np.inf, np.inf)
        w['i1'] = add(w['id'] + '.c1', w['c1'], -np.inf, np.inf)
    iv = add('v', 0.0, -1000.0, 1000.0)
    isg = add('s', 100.0, 0.0, 700.0)
    flux_index = {}
    for w in wins:
        sl = slice(w['start'], w['end'])
        cont = w['c0'] + w['c1'] * t[sl]
        for line in w['lines']:
            if line['parent'] is not None:
                continue
            near = np.abs(lam[sl] / line['expected'] - 1) * C < 300
            f0 = max(0.0, float(np.sum((y[sl][near] - cont[near]) * (hi[sl][near] - lo[sl][near]))))
            flux_index[line['id']] = add(line['id'], f0, 0.0, np.inf)
    terms = []  # (slice, expected, sigma_inst, flux index, multiplier)
    for w in wins:
        sl = slice(w['start'], w['end'])
        for line in w['lines']:
            owner = line['parent'] or line['id']
            mult = 1.0 / line['ratio'] if line['parent'] is not None else 1.0
            terms.append((sl, line['expected'], line['sigmaInst'], flux_index[owner], mult))

    def model(_x, *p):
        out = np.empty_like(lam)
        for w in wins:
            sl = slice(w['start'], w['end'])
            out[sl] = p[w['i0']] + p[w['i1']] * t[sl]
        v, s = p[iv], p[isg]
        for sl, expected, si, fi, mult in terms:
            lc = expected * (1 + v / C)
            sig2 = (lc * s / C) ** 2 + si * si
            x = lam[sl] - lc
            out[sl] += mult * p[fi] * np.exp(-0.5 * x * x / sig2) / np.sqrt(2 * np.pi * sig2)
        return out

    popt, pcov = curve_fit(model, lam, y, p0=p0, sigma=err, absolute_sigma=True, bounds=(lower, upper), method='trf')
    perr = np.sqrt(np.diag(pcov))
    ha = next(l for w in wins for l in w['lines'] if l['id'] == 'halpha')
    pick = lambda i: [float(popt[i]), float(perr[i])]
    return {'halpha': pick(flux_index['halpha']), 'oiii_5007': pick(flux_index['oiii_5007']), 'v': pick(iv), 's': pick(isg),
            'sigmaInstHalpha': C * ha['sigmaInst'] / ha['expected']}


def main():
    with open(sys.argv[1]) as f:
        spectra = json.load(f)
    warnings.simplefilter('ignore', OptimizeWarning)
    passes = []
    for _ in range(int(sys.argv[2]) if len(sys.argv) > 2 else 1):
        fits = []
        failed = 0
        t0 = time.perf_counter()
        for sp in spectra:
            try:
                fits.append(fit_one(dict(sp, windows=[dict(w) for w in sp['windows']])))
            except (RuntimeError, ValueError):
                failed += 1
                nan = [float('nan'), float('nan')]
                fits.append({'halpha': nan, 'oiii_5007': nan, 'v': nan, 's': nan, 'sigmaInstHalpha': float('nan')})
        passes.append(time.perf_counter() - t0)
    print(json.dumps({'scipy': scipy.__version__, 'numpy': np.__version__, 'python': platform.python_version(), 'seconds': min(passes),
                      'passes': passes, 'failed': failed, 'fits': fits}))


if __name__ == '__main__':
    main()
