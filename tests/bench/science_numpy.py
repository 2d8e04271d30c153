#!/usr/bin/env python3
"""The deterministic science chain of shared/diagnostics/kernel.ts written as vectorised numpy, for the
benchmark in science.bench.ts (which writes the synthetic galaxies to a binary file and runs this script
as a child process). Same formulas, same conventions (shared/science/README.md), same outputs in spirit: thresholds,
E(B-V) with the Hgamma fallback and clipping, dereddened fluxes and errors, ratios and their errors and
limit states, classes with the limit rules, WHAN, overall class, perpendicular distances, densities,
temperatures iterated with the [S II] density, metallicities, D_L, SFR and black-hole masses.

usage: science_numpy.py INPUT.f64 N  ->  prints one JSON line with timing and a summary of the outputs

Needs numpy only (written against Debian 12's python3-numpy 1.24.2 on Python 3.11.2; scipy is not used).
Timed: the calls of run() on the galaxies already in memory, nothing else (not the reading of the input
file, not the warm-up, not the class counts and sums of the summary), like the kernel seconds of the
TypeScript side. Iterative steps (closest points on the curves, T_e) work on the rows that need them and
drop each row once it has converged, instead of a fixed number of sweeps over every row.
"""
import json
import sys
import time

import numpy as np

LN10 = np.log(10.0)
HA, HB, HG, HD, O3, O3W, O3A, N2, N2W, N2A, S1, S2, O1, O2A, O2B, BR = range(16)
AIR = np.array([6562.80, 4861.33, 4340.47, 4101.74, 5006.84, 4958.91, 4363.21, 6583.45, 6548.05, 5754.64,
                6716.44, 6730.82, 6300.30, 3726.03, 3728.82, 6562.80])
RV, INTRINSIC, TE_SET, MIN_SNR, H0, OM = 3.1, 2.86, 1e4, 3.0, 70.0, 0.3
C_KMS, CM_PER_MPC = 299792.458, 3.0856775814913673e24


def ccm89(wave, rv):
    x = 1e4 / wave
    y = x - 1.82
    a = np.polyval([0.32999, -0.7753, 0.01979, 0.72085, -0.02427, -0.50447, 0.17699, 1.0], y)
    b = np.polyval([-2.09002, 5.3026, -0.62251, -5.38434, 1.07233, 2.28305, 1.41338, 0.0], y)
    return rv * a + b  # every contract line is on the optical branch


K = ccm89(AIR, RV)
D_H = C_KMS / H0


def inv_e(zz):
    return 1 / np.sqrt(OM * (1 + zz) ** 3 + 1 - OM)


# D_C on nodes 0.002 j up to z = 10 (10-point Gauss-Legendre per panel), read back by cubic Hermite
# interpolation with the exact slope D_H/E(z): ~1e-10 relative, same scheme as the TypeScript's D_L cache
# (shared/diagnostics/luminosity.ts); built once at import, outside the timed part, like that cache.
Z_STEP, Z_MAX = 0.002, 10.0
_xg, _wg = np.polynomial.legendre.leggauss(10)
_zn = np.arange(round(Z_MAX / Z_STEP) + 1) * Z_STEP
_panel = 0.5 * Z_STEP * inv_e(_zn[:-1, None] + 0.5 * Z_STEP * (_xg[None, :] + 1)) @ _wg
DC_NODE = D_H * np.concatenate(([0.0], np.cumsum(_panel)))
DC_SLOPE = D_H * inv_e(_zn)


def luminosity_distance(z):
    """D_L in Mpc for z > 0 (NaN otherwise); beyond the table a 20-point Gauss-Legendre integral on [0, z]."""
    zt = np.where((z > 0) & (z < Z_MAX), z, 0.0) / Z_STEP
    j = zt.astype(np.intp)
    s = zt - j
    s2 = s * s
    s3 = s2 * s
    dc = ((2 * s3 - 3 * s2 + 1) * DC_NODE[j] + (s3 - 2 * s2 + s) * Z_STEP * DC_SLOPE[j]
          + (3 * s2 - 2 * s3) * DC_NODE[j + 1] + (s3 - s2) * Z_STEP * DC_SLOPE[j + 1])
    far = z >= Z_MAX
    if far.any():
        xg, wg = np.polynomial.legendre.leggauss(20)
        zf = z[far]
        dc[far] = D_H * 0.5 * zf * (inv_e(0.5 * zf[:, None] * (xg[None, :] + 1)) @ wg)
    return np.where(z > 0, (1 + z) * dc, np.nan)
C_HAHB = 2.5 / (K[HB] - K[HA])
C_HGHB = 2.5 / (K[HG] - K[HB])


def bracketed_root(g, dg, lo, hi, start, params, tol=1e-12, absolute=False, iters=100):
    """Newton steps kept inside a shrinking bracket [lo, hi] (g(lo) g(hi) <= 0), falling back to bisection,
    elementwise; g(t, *params) and dg(t, *params). A row leaves the iteration once its step is below
    tol (1 + |t|), or tol when absolute (then also once the bracket is that narrow), so each iteration
    costs only the rows still moving."""
    out = np.array(start, dtype=float)
    pos_lo = g(lo, *params) > 0
    a, b = np.where(pos_lo, hi, lo), np.where(pos_lo, lo, hi)
    rows, t = np.arange(out.size), out.copy()
    for _ in range(iters):
        gt = g(t, *params)
        neg = gt < 0
        a, b = np.where(neg, t, a), np.where(neg, b, t)
        with np.errstate(divide='ignore', invalid='ignore'):
            nxt = t - gt / dg(t, *params)
        done = (gt == 0) | (np.abs(nxt - t) <= (tol if absolute else tol * (1 + np.abs(t))))
        out[rows[done]] = np.where(gt[done] == 0, t[done], nxt[done])
        # a step that does not land strictly inside the bracket is replaced by bisection
        nxt = np.where(((nxt - a) * (nxt - b) < 0) & np.isfinite(nxt), nxt, 0.5 * (a + b))
        if absolute:
            narrow = ~done & (np.abs(b - a) <= tol)
            out[rows[narrow]] = nxt[narrow]
            done |= narrow
        keep = ~done
        if not keep.all():
            rows, t, a, b = rows[keep], nxt[keep], a[keep], b[keep]
            params = tuple(q[keep] if np.ndim(q) else q for q in params)
            if rows.size == 0:
                break
        else:
            t = nxt
    out[rows] = t
    return out


def hyperbola_distance(A, X0, C, x, y, sx, sy):
    """Signed perpendicular distance to the left branch of y = A/(x - X0) + C and its error along the normal
    (shared/science/README.md section 2.6). With the curve point (X0 - t, C - A/t), t > 0, the squared
    distance is stationary where p(t) = t^4 + u t^3 - A v t - A^2 = 0 (u = x - X0, v = y - C). p is concave
    on (0, tm) and convex beyond (tm = max(0, -u/2)), so there are at most two local minima: the largest
    root, by Newton steps that fall monotonically onto it from a start in the convex part with p > 0, and
    a smaller one in the concave part, sought only where p can be positive there; the closer one wins."""
    u = x - X0
    v = y - C
    av = A * v
    a2 = A * A
    p = lambda t, u, av: ((t + u) * t * t - av) * t - a2
    dp = lambda t, u, av: (4 * t + 3 * u) * t * t - av
    ddp = lambda t, u, av: 6 * t * (2 * t + u)
    bound = 1 + np.maximum(np.maximum(np.abs(u), np.abs(av)), a2)
    tm = np.where(u < 0, np.minimum(-u / 2, bound), 0.0)
    # (1) largest root: start at the larger of the vertical and horizontal projections onto the curve when
    #     that is in the convex part with p > 0 (usually close to the root), else at the bound
    with np.errstate(divide='ignore'):
        guess = np.maximum(-u, np.where(v < 0, -A / v, 0.0))
    t = np.where((guess > tm) & (guess < bound) & (p(guess, u, av) > 0), guess, bound)
    largest = np.full_like(u, -1.0)
    rows, tu, tu3, tav, ttm = np.arange(u.size), u, 3 * u, av, tm
    done = np.zeros(u.size, bool)
    # Rows stop when they converge or leave the convex part. A stopped row is not dropped at once (a
    # boolean gather per array and step costs more than the step): it is carried along and ignored, and
    # the arrays are gathered only once at most half of them still move.
    with np.errstate(all='ignore'):
        for _ in range(100):
            t2 = t * t
            step = ((t2 * (t + tu) - tav) * t - a2) / ((4 * t + tu3) * t2 - tav)  # p/p'
            nxt = t - step
            left = ~(nxt >= ttm)  # left the convex part: no root there
            new = (left | (np.abs(step) <= 1e-12 * (1 + nxt))) & ~done
            t = nxt
            if not new.any():
                continue
            got = np.flatnonzero(new & ~left)
            largest[rows[got]] = nxt[got]
            done |= new
            active = np.flatnonzero(~done)
            if active.size == 0:
                break
            if 2 * active.size < done.size:
                rows, t, tu, tu3, tav, ttm = rows[active], t[active], tu[active], tu3[active], tav[active], ttm[active]
                done = np.zeros(active.size, bool)

    def d2_of(t, r):
        with np.errstate(divide='ignore', invalid='ignore'):
            d2 = (u[r] + t) ** 2 + (v[r] + A / t) ** 2
        return np.where(t > 0, d2, np.inf)

    best_t = np.where(largest > 0, largest, 1.0)
    best = d2_of(largest, slice(None))

    def keep_closer(root, r):
        """Rows r take root where it lies closer than their best point so far."""
        d2 = d2_of(root, r)
        take = d2 < best[r]
        best[r[take]], best_t[r[take]] = d2[take], root[take]
    # (2) the concave part: p rises from p(0) = -A^2 to a local maximum and stays below -A v tm - A^2 there
    cand = np.flatnonzero((u < 0) & (-av * tm - a2 > 0))
    if cand.size:
        cu, cav, ctm = u[cand], av[cand], tm[cand]
        two = (-cav > 0) & (dp(ctm, cu, cav) < 0)  # a local maximum at c1 inside (0, tm)
        r_two = cand[two]
        if r_two.size:
            pu, pav, ptm = cu[two], cav[two], ctm[two]
            c1 = bracketed_root(dp, ddp, np.zeros_like(ptm), ptm, 0.5 * ptm, (pu, pav))
            hit = p(c1, pu, pav) > 0
            r_hit = r_two[hit]
            if r_hit.size:
                c1h = c1[hit]
                keep_closer(bracketed_root(p, dp, np.zeros_like(c1h), c1h, 0.5 * c1h, (pu[hit], pav[hit])), r_hit)
        one = ~two & (largest[cand] < 0)  # p' >= 0 throughout: the single root is in the concave part
        r_one = cand[one]
        if r_one.size:
            otm = ctm[one]
            keep_closer(bracketed_root(p, dp, np.zeros_like(otm), otm, 0.5 * otm, (cu[one], cav[one])), r_one)
    miss = np.flatnonzero(np.isinf(best))  # not reached for A > 0 (p(0) < 0 < p(bound)); safe fallback
    if miss.size:
        mb = bound[miss]
        root = bracketed_root(p, dp, np.zeros_like(mb), mb, 0.5 * mb, (u[miss], av[miss]))
        best[miss], best_t[miss] = d2_of(root, miss), root
    below = (x < X0) & (y < A / (x - X0) + C)
    d = np.where(below, -1.0, 1.0) * np.sqrt(best)
    s = A / best_t ** 2
    norm = np.sqrt(1 + s * s)
    err = np.sqrt((s / norm * sx) ** 2 + (sy / norm) ** 2)
    return d, err


def line_distance(m, q, x, y, sx, sy):
    r = np.sqrt(1 + m * m)
    return (y - m * x - q) / r, np.sqrt((m * sx) ** 2 + sy ** 2) / r


SII_FIT = (0.4315, 2107.0, 627.1)  # Sanders et al. 2016 [S II] a, b, c


def density(a, b, c, R, T):
    return (c * R - a * b) / (a - R) * np.sqrt(T / 1e4)


def temperature(coef, ex, dc, R, ne, guess):
    """T_e at fixed n_e from R = coef exp(ex/T)/(1 + dc n_e/sqrt(T)), by Newton steps in u = 1/T (where
    ln R is nearly linear) from the guess T; rows that do not settle in 6 steps go to the bracketed solver
    on [1/30000, 1/5000]. NaN where the root lies outside 5000-30000 K (shared/science/README.md section 4)."""
    lnt = np.log(R / coef)
    cn = dc * ne
    g = lambda u, cn, lnt: ex * u - np.log1p(cn * np.sqrt(u)) - lnt
    dg = lambda u, cn, lnt: ex - 0.5 * cn / np.sqrt(u) / (1 + cn * np.sqrt(u))
    lo, hi = 1 / 30000, 1 / 5000
    out = np.full_like(R, np.nan)
    settled = np.zeros(R.size, bool)
    rows, u, c, l = np.arange(R.size), 1 / guess, cn, lnt
    for _ in range(6):
        with np.errstate(invalid='ignore'):
            step = g(u, c, l) / dg(u, c, l)
        u = u - step
        conv = np.abs(step) <= 1e-11 * u
        done = rows[conv]
        settled[done] = True
        out[done] = np.where((u[conv] >= lo) & (u[conv] <= hi), 1 / u[conv], np.nan)
        keep = ~conv & (u > 0)
        rows, u, c, l = rows[keep], u[keep], c[keep], l[keep]
    rest = np.flatnonzero(~settled)
    if rest.size:
        c, l = cn[rest], lnt[rest]
        glo, ghi = g(lo, c, l), g(hi, c, l)
        ulo, uhi = np.full(rest.size, lo), np.full(rest.size, hi)
        root = bracketed_root(g, dg, ulo, uhi, 0.5 * (ulo + uhi), (c, l), tol=1e-14, absolute=True)
        root = np.where(glo == 0, lo, np.where(ghi == 0, hi, root))
        out[rest] = np.where((glo * ghi <= 0) & np.isfinite(glo) & np.isfinite(ghi), 1 / root, np.nan)
    return out


def temperature_with_density(coef, ex, dc, R, rs, use):
    """T_e with n_e from the [S II] ratio rs at the current T where `use`, else n_e = 100 cm^-3 and one
    solve; iterated until |dT| < 0.1 K, starting at the iteration's analytic fixed point when that lies in
    5000-30000 K, else at 1e4 K (shared/science/README.md section 4). Returns T_e (NaN: out of range) and
    the n_e of the last step."""
    with np.errstate(divide='ignore', invalid='ignore'):
        q = dc * np.where(use, density(*SII_FIT, rs, 1e4), 0.0) / 100
        fixed = ex / np.log(R * (1 + q) / coef)
    t = np.where(use & (fixed >= 5000) & (fixed <= 30000), fixed, 1e4)
    te_out = np.full_like(R, np.nan)
    ne_out = np.full_like(R, 100.0)
    rows, rsr, user = np.arange(R.size), rs, use
    Rr = R
    for _ in range(50):
        with np.errstate(divide='ignore', invalid='ignore'):
            ne = np.where(user, density(*SII_FIT, rsr, t), 100.0)
        nxt = temperature(coef, ex, dc, Rr, ne, t)
        ne_out[rows] = ne
        te_out[rows] = nxt
        keep = ~np.isnan(nxt) & user & ~(np.abs(nxt - t) < 0.1)
        rows, t, rsr, user, Rr = rows[keep], nxt[keep], rsr[keep], user[keep], Rr[keep]
        if rows.size == 0:
            break
    return te_out, ne_out


def run(cols, n):
    val, err, kind = cols[0:16], cols[16:32], cols[32:48]
    z, unit, ew_ha, ew_nii, fwhm = cols[48], cols[49], cols[50], cols[51], cols[52]
    measured = kind == 1
    det = measured & (val >= MIN_SNR * err)
    below_snr = measured & ~det
    lim = below_snr | (kind == 2)
    fl = np.where(below_snr, MIN_SNR * err, val)
    with np.errstate(divide='ignore', invalid='ignore'):
        rel = np.where(det, err / val, 0.0)
    # dust
    hahb = det[HA] & det[HB]
    hghb = ~det[HA] & det[HG] & det[HB]
    with np.errstate(divide='ignore', invalid='ignore'):
        raw = np.where(hahb, C_HAHB * np.log10(fl[HA] / fl[HB] / INTRINSIC),
                       np.where(hghb, C_HGHB * np.log10(0.468 / (fl[HG] / fl[HB])), np.nan))
    cdust = np.where(hahb, C_HAHB, np.where(hghb, C_HGHB, 0.0))
    r1 = np.where(hahb, rel[HA], np.where(hghb, rel[HB], 0.0))
    r2 = np.where(hahb, rel[HB], np.where(hghb, rel[HG], 0.0))
    ebv_err = cdust / LN10 * np.sqrt(r1 ** 2 + r2 ** 2)
    ebv = np.where(np.isnan(raw), 0.0, np.maximum(raw, 0.0))
    dust_on = np.where(raw > 0, cdust, 0.0)
    # dereddened fluxes and errors (covariance with the dust lines, shared/science/README.md section 9)
    factor = np.exp(0.4 * LN10 * K[:, None] * ebv[None, :])
    dfl = np.where(det | lim, fl * factor, np.nan)
    # Q = ln F_corr of line l has derivative 1 on its own flux and +-eta_l = +-0.4 k_l C on the dust
    # numerator / denominator line, so var = rel_l^2 + eta_l^2 (r1^2 + r2^2) for every line but the dust
    # lines themselves, whose own term merges with the eta terms (fixed below, one row each)
    dvar = rel ** 2 + (0.4 * K[:, None]) ** 2 * (dust_on ** 2 * (r1 ** 2 + r2 ** 2))[None, :]
    never = np.zeros(n, bool)
    for line, num, den in ((HA, hahb, never), (HB, hghb, hahb), (HG, never, hghb)):  # role as dust numerator / denominator
        eta = 0.4 * K[line] * dust_on
        dvar[line] = np.where(num | den, 0.0, rel[line] ** 2) + ((eta + num) * r1) ** 2 + ((den - eta) * r2) ** 2
    derr = np.where(det, dfl * np.sqrt(dvar), np.nan)

    # ratios
    def ratio(sn, fn, rn, sd, fd, rd, log=True):
        exact = sn[0] & sd[0]
        upper = sn[1] & sd[0]
        lower = sn[0] & sd[1]
        ok = exact | upper | lower
        with np.errstate(divide='ignore', invalid='ignore'):
            q = np.where(ok, fn / fd, np.nan)
            v = np.log10(q) if log else q
        e = np.sqrt(rn ** 2 + rd ** 2)
        e = np.where(exact, e / LN10 if log else q * e, np.nan)
        status = np.where(exact, 0, np.where(upper, 1, np.where(lower, 2, 3)))
        return v, e, status

    st = lambda l: (det[l], lim[l])
    s_sum = (det[S1] & det[S2], (det[S1] | lim[S1]) & (det[S2] | lim[S2]) & ~(det[S1] & det[S2]))
    ssum = fl[S1] + fl[S2]
    srel = np.sqrt((rel[S1] * fl[S1]) ** 2 + (rel[S2] * fl[S2]) ** 2) / ssum
    xn, exn, sxn = ratio(st(N2), fl[N2], rel[N2], st(HA), fl[HA], rel[HA])
    yy, ey, sy = ratio(st(O3), fl[O3], rel[O3], st(HB), fl[HB], rel[HB])
    xs, exs, sxs = ratio(s_sum, ssum, srel, st(HA), fl[HA], rel[HA])
    xo, exo, sxo = ratio(st(O1), fl[O1], rel[O1], st(HA), fl[HA], rel[HA])
    rsii, ersii, _ = ratio(st(S1), fl[S1], rel[S1], st(S2), fl[S2], rel[S2], log=False)
    roii, eroii, _ = ratio(st(O2B), fl[O2B], rel[O2B], st(O2A), fl[O2A], rel[O2A], log=False)

    # classes (1 SF, 2 composite, 3 agn, 4 seyfert, 5 liner, 6 ambiguous, 0 unclassified)
    def below(A, X0, C, x, y):
        with np.errstate(divide='ignore', invalid='ignore'):
            return (x < X0) & (y < A / (x - X0) + C)

    def proven(cls, sx_, sy_):
        up = lambda s: (s == 0) | (s == 1)
        lo = lambda s: (s == 0) | (s == 2)
        both = (sx_ == 0) & (sy_ == 0)
        r = np.where(both, cls, 0)
        r = np.where(~both & (cls == 1) & up(sx_) & up(sy_), 1, r)
        r = np.where(~both & (cls == 3) & lo(sx_) & lo(sy_), 3, r)
        r = np.where(~both & (cls == 4) & (sx_ == 0) & (sy_ == 2), 4, r)
        r = np.where(~both & (cls == 5) & (sy_ == 0) & (sx_ == 2), 5, r)
        return np.where((sx_ == 3) | (sy_ == 3), 0, r)

    face_n = np.where(below(0.61, 0.05, 1.30, xn, yy), 1, np.where(below(0.61, 0.47, 1.19, xn, yy), 2, 3))
    nii = proven(face_n, sxn, sy)
    sub = np.where(nii == 3, proven(np.where(yy > 1.05 * xn + 0.45, 4, 5), sxn, sy), 0)
    face_s = np.where(below(0.72, 0.32, 1.30, xs, yy), 1, np.where(yy > 1.89 * xs + 0.76, 4, 5))
    sii = proven(face_s, sxs, sy)
    face_o = np.where(below(0.73, -0.59, 1.33, xo, yy), 1, np.where(yy > 1.18 * xo + 1.30, 4, 5))
    oi = proven(face_o, sxo, sy)
    # WHAN (7 strong, 8 weak, 9 retired, 10 passive)
    agn = np.where(ew_ha > 6, 7, 8)
    whan = np.where(xn < -0.4, np.where((sxn == 0) | (sxn == 1), 1, 0), np.where((sxn == 0) | (sxn == 2), agn, 0))
    whan = np.where(sxn == 3, 0, whan)
    whan = np.where(ew_ha < 3, np.where((ew_ha < 0.5) & (ew_nii < 0.5), 10, 9), whan)
    whan = np.where(np.isnan(ew_ha), 0, whan)
    # overall (Kewley et al. 2006 with the shared/science/README.md section 2.4 conventions)
    have_s, have_o = sii != 0, oi != 0
    side = np.where(have_s, sii, oi)
    agree = ~(have_s & have_o) | (sii == oi)
    from_side = np.where(side == 1, np.where((nii == 1) | (nii == 2), nii, 6), np.where(nii == 3, side, 6))
    only_n = np.where(nii == 3, sub, nii)
    overall = np.where(have_s | have_o, np.where(agree, from_side, 6), only_n)
    overall = np.where(nii == 0, 0, overall)

    # distances for exact points
    ex_n = (sxn == 0) & (sy == 0)
    ex_s = (sxs == 0) & (sy == 0)
    ex_o = (sxo == 0) & (sy == 0)

    def on_rows(fn, m, curve, xr, exr):
        """fn on the exact points only (the others get NaN): the closest-point search is the costliest step."""
        r = np.flatnonzero(m)
        d, e = np.full(n, np.nan), np.full(n, np.nan)
        d[r], e[r] = fn(*curve, xr[r], yy[r], exr[r], ey[r])
        return d, e

    d_ka, e_ka = on_rows(hyperbola_distance, ex_n, (0.61, 0.05, 1.30), xn, exn)
    d_ken, e_ken = on_rows(hyperbola_distance, ex_n, (0.61, 0.47, 1.19), xn, exn)
    d_s07, e_s07 = on_rows(line_distance, ex_n, (1.05, 0.45), xn, exn)
    d_kes, e_kes = on_rows(hyperbola_distance, ex_s, (0.72, 0.32, 1.30), xs, exs)
    d_ke6s, e_ke6s = on_rows(line_distance, ex_s, (1.89, 0.76), xs, exs)
    d_keo, e_keo = on_rows(hyperbola_distance, ex_o, (0.73, -0.59, 1.33), xo, exo)
    d_ke6o, e_ke6o = on_rows(line_distance, ex_o, (1.18, 1.30), xo, exo)
    distances = [d_ka, d_ken, d_s07, d_kes, d_ke6s, d_keo, d_ke6o, e_ka, e_ken, e_s07, e_kes, e_ke6s, e_keo, e_ke6o]
    nearest = np.where(np.abs(d_ka) <= np.abs(d_ken), d_ka, d_ken)  # NaN where not exact

    # densities (Sanders et al. 2016) with range checks
    def dens(a, b, c, R, ok, eR):
        r_lo = a * (b + 1) / (c + 1)
        r_hi = a * (b + 1e5) / (c + 1e5)
        good = ok & (R < r_lo) & (R > r_hi)
        with np.errstate(divide='ignore', invalid='ignore'):
            ne = np.where(good, density(a, b, c, R, TE_SET), np.nan)
            dn = np.abs(a * (c - b) / (a - R) ** 2) * np.sqrt(TE_SET / 1e4)
        return ne, np.where(good, dn * eR, np.nan), good

    ne_s, ene_s, good_s = dens(0.4315, 2107.0, 627.1, rsii, det[S1] & det[S2], ersii)
    ne_o, ene_o, _ = dens(0.3771, 2468.0, 638.4, roii, det[O2A] & det[O2B], eroii)

    def var_comb(terms, r):
        """Variance of sum a_i ln F_corr,i on rows r (shared/science/README.md section 9): the lines' own
        terms plus +-eta through the dust numerator / denominator lines. A term is (a, rel, line, k), rel
        and k for rows r, line -1 for a doublet sum (never a dust line)."""
        d_on, h1, h2, q1, q2 = dust_on[r], hahb[r], hghb[r], r1[r], r2[r]
        on = d_on > 0
        eta_ = sum(a * 0.4 * k * d_on for a, _, _, k in terms)
        cd1 = eta_
        cd2 = -eta_
        var = 0.0
        for a, q, line, _ in terms:
            is1 = ((line == HA) & h1 | (line == HB) & h2) & on
            is2 = ((line == HB) & h1 | (line == HG) & h2) & on
            cd1 = cd1 + a * is1
            cd2 = cd2 + a * is2
            var = var + np.where(is1 | is2, 0.0, (a * q) ** 2)
        return var + (cd1 * q1) ** 2 + (cd2 * q2) ** 2

    # temperatures iterated with the [S II] density (shared/science/README.md section 4), on the rows
    # with the strong and the auroral line detected (the only ones with a T_e)
    def te(coef, ex, dc, strong, weak, aur, fixed):
        r = np.flatnonzero(det[strong] & det[aur])
        have_w = det[weak][r]
        fs, fw, fa = dfl[strong][r], dfl[weak][r], dfl[aur][r]
        num = np.where(have_w, fs + fw, fs * (1 + 1 / fixed))
        t_r, ne_r = temperature_with_density(coef, ex, dc, num / fa, rsii[r], good_s[r])
        srel_num = np.where(have_w, np.sqrt((fs * rel[strong][r]) ** 2 + (fw * rel[weak][r]) ** 2) / num, rel[strong][r])
        k_num = np.where(have_w, (fs * K[strong] + fw * K[weak]) / num, K[strong])
        sig_lnr = np.sqrt(var_comb([(1, srel_num, -1, k_num), (-1, rel[aur][r], aur, K[aur])], r))
        slope = -ex / t_r ** 2 + 0.5 * dc * ne_r / t_r ** 1.5 / (1 + dc * ne_r / np.sqrt(t_r))
        tt, ett, ne = np.full(n, np.nan), np.full(n, np.nan), np.full(n, np.nan)
        tt[r], ett[r], ne[r] = t_r, sig_lnr / np.abs(slope), ne_r
        return tt, np.where(np.isnan(tt), np.nan, ett), np.where(np.isnan(tt), np.nan, ne)

    te_o3, ete_o3, ne_o3 = te(7.90, 3.29e4, 4.5e-4, O3, O3W, O3A, 2.98)
    te_n2, ete_n2, ne_n2 = te(8.23, 2.50e4, 4.4e-3, N2, N2W, N2A, 3.05)

    # metallicities (star-forming only), dereddened indices and their errors, on the rows where N2 exists
    # (every index needs [N II] and Halpha); NaN elsewhere
    r = np.flatnonzero((overall == 1) & det[N2] & det[HA])
    fn2, fha, fo3, fhb, fs1, fs2 = (dfl[l][r] for l in (N2, HA, O3, HB, S1, S2))
    n2i = np.log10(fn2 / fha)
    o3n2 = np.where(det[O3][r] & det[HB][r], np.log10(fo3 / fhb) - n2i, np.nan)
    s2d = fs1 + fs2
    with np.errstate(invalid='ignore'):
        d16 = np.where(det[S1][r] & det[S2][r], np.log10(fn2 / s2d) + 0.264 * n2i, np.nan)
    rl = lambda l: rel[l][r]
    sn2 = np.sqrt(var_comb([(1, rl(N2), N2, K[N2]), (-1, rl(HA), HA, K[HA])], r)) / LN10
    so3n2 = np.sqrt(var_comb([(1, rl(O3), O3, K[O3]), (-1, rl(HB), HB, K[HB]), (-1, rl(N2), N2, K[N2]), (1, rl(HA), HA, K[HA])], r)) / LN10
    s2rel = np.sqrt((fs1 * rl(S1)) ** 2 + (fs2 * rl(S2)) ** 2) / s2d
    s2k = (fs1 * K[S1] + fs2 * K[S2]) / s2d
    sd16 = np.sqrt(var_comb([(1.264, rl(N2), N2, K[N2]), (-1, s2rel, -1, s2k), (-0.264, rl(HA), HA, K[HA])], r)) / LN10
    with np.errstate(invalid='ignore'):
        rng_ = lambda v, lo, hi: np.where((v > lo) & (v < hi), v, np.nan)
        n2r, n2m = rng_(n2i, -2.5, -0.3), rng_(n2i, -1.6, -0.2)
        o3p, o3m = rng_(o3n2, -1, 1.9), rng_(o3n2, -1.1, 1.7)
        zd16 = 8.77 + d16 + 0.45 * (d16 + 0.3) ** 5
        zd16 = np.where(zd16 <= 9.05, zd16, np.nan)
    met_r = [8.90 + 0.57 * n2r, 9.37 + 2.03 * n2r + 1.26 * n2r ** 2 + 0.32 * n2r ** 3, 8.73 - 0.32 * o3p,
             8.743 + 0.462 * n2m, 8.533 - 0.214 * o3m, zd16]
    met_err_r = [0.57 * sn2, np.abs(2.03 + 2.52 * n2r + 0.96 * n2r ** 2) * sn2, 0.32 * so3n2, 0.462 * sn2, 0.214 * so3n2,
                 (1 + 2.25 * (d16 + 0.3) ** 4) * sd16]
    met, met_err = np.full((6, n), np.nan), np.full((6, n), np.nan)
    met[:, r] = met_r
    met_err[:, r] = np.where(np.isnan(met_r), np.nan, met_err_r)

    dl = luminosity_distance(z)
    dcm = dl * CM_PER_MPC
    lha = np.where(det[HA], 4 * np.pi * dcm ** 2 * dfl[HA] * unit, np.nan)
    lha_err = lha * np.sqrt(dvar[HA])
    sfr98, sfr12 = 7.9e-42 * lha, lha * 10 ** -41.27
    lb = np.where(det[BR] & (fwhm > 0), 4 * np.pi * dcm ** 2 * fl[BR] * unit, np.nan)
    mbh = 2.0e6 * (lb / 1e42) ** 0.55 * (fwhm / 1e3) ** 2.06
    log_m, log_m_err = np.log10(mbh), 0.55 * rel[BR] / LN10

    outputs = dict(ebv=ebv, ebv_err=ebv_err, dfl=dfl, derr=derr, xn=xn, yy=yy, nii=nii, sii=sii, oi=oi, whan=whan,
                   overall=overall, distances=distances, nearest=nearest, ne_s=ne_s, ene_s=ene_s, ne_o=ne_o, ene_o=ene_o,
                   te_o3=te_o3, ete_o3=ete_o3, te_n2=te_n2, ete_n2=ete_n2, met=met, met_err=met_err, lha=lha,
                   lha_err=lha_err, dl=dl, sfr98=sfr98, sfr12=sfr12, mbh=mbh, log_m=log_m, log_m_err=log_m_err, sub=sub)
    return outputs


def main():
    path, n = sys.argv[1], int(sys.argv[2])
    cols = np.fromfile(path, dtype=np.float64).reshape(53, n)
    chunk = 100000
    run(cols[:, :1000].copy(), 1000)  # warm-up
    t0 = time.perf_counter()
    summary = None
    counts = {k: np.zeros(11, np.int64) for k in ('nii', 'sii', 'oi', 'whan', 'overall')}
    sums = {'ebv': 0.0, 'te_o3': 0.0, 'n_te_o3': 0, 'n2Pp04': 0.0, 'n_n2Pp04': 0}
    for s in range(0, n, chunk):
        e = min(n, s + chunk)
        out = run(cols[:, s:e], e - s)
        for k in counts:
            counts[k] += np.bincount(out[k].astype(np.int64), minlength=11)
        sums['ebv'] += float(np.sum(out['ebv']))
        ok = ~np.isnan(out['te_o3'])
        sums['te_o3'] += float(np.sum(out['te_o3'][ok]))
        sums['n_te_o3'] += int(ok.sum())
        ok = ~np.isnan(out['met'][0])
        sums['n2Pp04'] += float(np.sum(out['met'][0][ok]))
        sums['n_n2Pp04'] += int(ok.sum())
    seconds = time.perf_counter() - t0
    summary = {k: v.tolist() for k, v in counts.items()}
    summary.update(sums)
    print(json.dumps({'numpy': np.__version__, 'python': sys.version.split()[0], 'n': n, 'seconds': seconds,
                      'summary': summary}))


if __name__ == '__main__':
    main()
