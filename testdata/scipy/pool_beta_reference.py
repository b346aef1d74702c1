#!/usr/bin/python3
"""The single Beta that stands in for a linear pool, found apart from Parley.

For elicit's TestBestBetaAgainstSciPy (elicit/pool_reference_test.go), which
checks Pool.BestBeta and Representation.Far: the Beta a facilitator may agree
as the panel's prior, and the checks that say whether it stands in for the
pool only roughly.

Generated with Debian's python3-scipy (1.10.1); run from the repository root:

    /usr/bin/python3 testdata/scipy/pool_beta_reference.py > testdata/scipy/pool_beta_reference.csv

For each pool (invented test cases, not data from anywhere):
  - the pool's quantiles Q(p_k) at p_k = k/100, k = 1..99, by
    scipy.optimize.brentq on the mixture CDF sum_i w_i betainc(a_i, b_i, u)
    (scipy.stats.beta.cdf, Boost's incomplete beta), weights normalised;
  - the least-squares Beta on the probability scale,
        minimise S(a, b) = sum_k (betainc(a, b, u_k) - p_k)^2,
    u_k = (Q(p_k) - lower)/(upper - lower), over 1e-6 <= a, b <= 1e7
    (elicit.MinShape, elicit.MaxShape): S on a lattice of log a, log b
    spaced 0.25 over the whole box, then scipy.optimize.least_squares
    (trust-region reflective, in log a and log b) from the 24 lowest local
    minima and the 12 lowest points of the lattice, the best polished once
    more with tight tolerances;
  - the pool's mean and sd from each component's scipy.stats.beta moments
    (law of total expectation and variance), checked here against
    scipy.integrate.quad of x and x^2 against each component's density
    (QUADPACK's algebraic weight at an end where the density is unbounded);
  - the distances Parley reports: the largest |betainc(a, b, u) - F(u)| over
    the whole of [0, 1], F the pool's CDF (largest_cdf_gap: dense points
    where every CDF rises by at most 1/4000 and log-spaced tails, each
    local maximum refined by scipy.optimize.minimize_scalar),
    the Beta's quantile less the pool's at 0.05, 0.5 and 0.95, the Beta's
    sd over the pool's, the width of the Beta's central 90% interval over
    the pool's; and the verdicts: far_cdf when the largest distance is
    above 0.05, far_sd and far_interval when the ratio lies outside
    [1/1.2, 1.2] (the rules elicit's doc comments state: PoorFitThreshold,
    SpreadRatioLimit). Each verdict's margin from its limit is asserted to
    be at least 1e-3 so that rounding cannot flip it.

Columns: name,lower,upper,components,alpha,beta,sse,max_cdf_error,mean,sd,
         sd_ratio,interval_ratio,qdiff05,qdiff50,qdiff95,far_cdf,far_sd,far_interval
  components  "alpha:beta:weight|..." with the raw weights
"""
import math
import sys

import numpy as np
import scipy
from scipy import integrate, optimize, special, stats

LO, HI = math.log(1e-6), math.log(1e7)
GRID = np.linspace(LO, HI, int(round((HI - LO) / 0.25)) + 1)
PROBS = np.arange(1, 100) / 100.0
POOR_FIT, SPREAD = 0.05, 1.2

# name, lower, upper, [(alpha, beta, raw weight), ...]: invented panels.
POOLS = [
    ("tight agreeing", 0.0, 1.0, [(400, 600, 1), (420, 580, 1), (390, 610, 1)]),
    ("skewed agreeing", 0.0, 1.0, [(2, 40, 2), (1.5, 30, 1), (3, 55, 1)]),
    ("two experts apart", 0.0, 1.0, [(4, 36, 1), (30, 30, 1)]),
    ("J against J", 0.0, 1.0, [(5, 45, 1), (45, 5, 1)]),
    ("rare event", 0.0, 1.0, [(0.5, 2000, 1), (1.2, 800, 1), (2, 5000, 1)]),
    ("U shape and a hump", 0.0, 1.0, [(0.3, 0.3, 1), (5, 5, 1)]),
    ("sharp minority", 0.0, 1.0, [(2, 6, 0.9), (900, 100, 0.1)]),
    ("broad high against narrow low", 0.0, 1.0, [(8, 2.5, 0.35), (29, 335, 1)]),
    ("hours on a scale", 10.0, 250.0, [(3, 7, 1), (6, 4, 2), (2.5, 9, 1)]),
    ("sharp and vague agreeing", 0.0, 1.0, [(60, 140, 1), (1.5, 3.5, 1)]),
    # Near the limits, so that a changed limit changes a verdict: a largest
    # CDF distance just under and just over 0.05, an interval ratio just
    # over 1.2, an sd ratio just under 1/1.2.
    ("two close humps", 0.0, 1.0, [(10, 40, 1), (20, 30, 1)]),
    ("two humps a little apart", 0.0, 1.0, [(10, 40, 1), (20.4, 29.6, 1)]),
    ("a rare sceptic", 0.0, 1.0, [(10, 90, 1), (2, 8, 0.02)]),
]


def pool_parts(comps):
    w = np.array([c[2] for c in comps], dtype=float)
    w = w / math.fsum(w)
    ds = [stats.beta(a, b) for a, b, _ in comps]
    return w, ds


def pool_quantile(w, ds, p):
    f = lambda u: math.fsum(wi * d.cdf(u) for wi, d in zip(w, ds)) - p
    return optimize.brentq(f, 0.0, 1.0, xtol=1e-300, rtol=1e-15, maxiter=2000)


def fit(u, p):
    def resid(th):
        return special.betainc(math.exp(th[0]), math.exp(th[1]), u) - p
    a = np.exp(GRID)[:, None, None]
    b = np.exp(GRID)[None, :, None]
    s_grid = np.sum((special.betainc(a, b, u[None, None, :]) - p[None, None, :]) ** 2, axis=2)
    pad = np.pad(s_grid, 1, constant_values=np.inf)
    low = np.ones_like(s_grid, dtype=bool)
    for di in (-1, 0, 1):
        for dj in (-1, 0, 1):
            if di or dj:
                low &= s_grid <= pad[1 + di:1 + di + s_grid.shape[0], 1 + dj:1 + dj + s_grid.shape[1]]
    mins = sorted(zip(*np.nonzero(low)), key=lambda ij: s_grid[ij])
    starts = set(mins[:24])
    starts |= set(zip(*np.unravel_index(np.argsort(s_grid, axis=None)[:12], s_grid.shape)))
    best = None
    for i, j in starts:
        r = optimize.least_squares(resid, np.array([GRID[i], GRID[j]]), bounds=([LO, LO], [HI, HI]),
                                   method="trf", xtol=1e-14, ftol=1e-14, gtol=1e-14, max_nfev=1000)
        s = math.fsum(r.fun ** 2)
        if best is None or s < best[1]:
            best = (r.x, s)
    r = optimize.least_squares(resid, best[0], bounds=([LO, LO], [HI, HI]), method="trf",
                               xtol=1e-15, ftol=1e-15, gtol=1e-15, max_nfev=2000)
    s = math.fsum(r.fun ** 2)
    if s < best[1]:
        best = (r.x, s)
    return math.exp(best[0][0]), math.exp(best[0][1]), best[1]


def largest_cdf_gap(w, comps_ab, a, b):
    """sup over u in [0, 1] of |betainc(a, b, u) - sum_i w_i betainc(a_i, b_i, u)|:
    dense points (each component's and the Beta's quantiles at k/4000 by
    scipy.special.betaincinv, and 400 log-spaced points in each tail down
    to 1e-300 of a bound), then
    scipy.optimize.minimize_scalar (bounded Brent) on the exact difference
    between the neighbours of every local maximum, in ln u or ln(1 - u)
    within the tails."""
    ca = np.array([c[0] for c in comps_ab], dtype=float)[:, None]
    cb = np.array([c[1] for c in comps_ab], dtype=float)[:, None]
    wv = np.asarray(w, dtype=float)[:, None]

    def gap(u):
        u = np.atleast_1d(np.asarray(u, dtype=float))
        lo = special.betainc(a, b, u) - np.sum(wv * special.betainc(ca, cb, u[None, :]), axis=0)
        hi = np.sum(wv * special.betainc(cb, ca, 1 - u[None, :]), axis=0) - special.betainc(b, a, 1 - u)
        return np.where(u <= 0.5, lo, hi)

    # Every CDF involved rises by at most 1/4000 between neighbouring
    # points: each component's and the Beta's own quantiles at k/4000.
    p = np.arange(1, 4000) / 4000.0
    mid = np.concatenate([special.betaincinv(x, y, p) for x, y in [*comps_ab, (a, b)]])
    mid = mid[(mid > 0) & (mid < 1)]
    tail = np.logspace(-300, math.log10(min(mid.min(), 0.5)), 400)
    top = 1 - np.logspace(-300, math.log10(min(1 - mid.max(), 0.5)), 400)
    u = np.unique(np.concatenate([tail, mid, top[top < 1]]))
    g = gap(u)
    best = float(np.max(np.abs(g)))
    for s in (1.0, -1.0):
        v = s * g
        for k in range(len(u)):
            left = v[k - 1] if k > 0 else -np.inf
            right = v[k + 1] if k + 1 < len(u) else -np.inf
            if not (v[k] > 0 and v[k] >= left and v[k] >= right):
                continue
            lo, hi = u[max(k - 1, 0)], u[min(k + 1, len(u) - 1)]
            if hi < 0.5 and hi > 16 * lo:
                f = lambda t: -s * gap(math.exp(t))[0]
                r = optimize.minimize_scalar(f, bounds=(math.log(lo), math.log(hi)), method="bounded",
                                             options=dict(xatol=1e-14))
            elif lo > 0.5 and 1 - lo > 16 * (1 - hi):
                f = lambda t: -s * gap(1 - math.exp(t))[0]
                r = optimize.minimize_scalar(f, bounds=(math.log1p(-hi), math.log1p(-lo)), method="bounded",
                                             options=dict(xatol=1e-14))
            else:
                f = lambda x: -s * gap(x)[0]
                r = optimize.minimize_scalar(f, bounds=(lo, hi), method="bounded",
                                             options=dict(xatol=1e-15 * max(hi - lo, 1e-300) + 1e-17 * hi))
            best = max(best, -float(r.fun))
    return best


def moments(w, ds):
    m1 = math.fsum(wi * d.moment(1) for wi, d in zip(w, ds))
    m2 = math.fsum(wi * d.moment(2) for wi, d in zip(w, ds))
    # The same by quadrature, component by component: x^k against each
    # density on pieces split at its bulk; where a shape is below 1 and the
    # density unbounded at that end, the end piece takes the singular
    # factor as QUADPACK's algebraic weight (QAWS).
    def raw(k, a, b):
        d, c = stats.beta(a, b), math.exp(-special.betaln(a, b))
        cuts = sorted({0.0, *d.ppf([1e-6, 0.5, 1 - 1e-6]), 1.0})
        total = []
        for lo, hi in zip(cuts, cuts[1:]):
            opts = dict(epsabs=0, epsrel=1e-13, limit=200)
            if lo == 0 and a < 1:
                v = integrate.quad(lambda x: c * x ** k * (1 - x) ** (b - 1), lo, hi, weight="alg", wvar=(a - 1, 0), **opts)
            elif hi == 1 and b < 1:
                v = integrate.quad(lambda x: c * x ** (k + a - 1), lo, hi, weight="alg", wvar=(0, b - 1), **opts)
            else:
                v = integrate.quad(lambda x: x ** k * d.pdf(x), lo, hi, **opts)
            total.append(v[0])
        return math.fsum(total)
    q1 = math.fsum(wi * raw(1, d.args[0], d.args[1]) for wi, d in zip(w, ds))
    q2 = math.fsum(wi * raw(2, d.args[0], d.args[1]) for wi, d in zip(w, ds))
    assert abs(q1 - m1) <= 1e-9 * m1 and abs(q2 - m2) <= 1e-9 * m2, (m1, q1, m2, q2)
    return m1, math.sqrt(m2 - m1 * m1)


def main():
    print(f"# scipy {scipy.__version__}, numpy {np.__version__}, python {sys.version.split()[0]}; "
          "generated by testdata/scipy/pool_beta_reference.py")
    print("name,lower,upper,components,alpha,beta,sse,max_cdf_error,mean,sd,"
          "sd_ratio,interval_ratio,qdiff05,qdiff50,qdiff95,far_cdf,far_sd,far_interval")
    for name, lower, upper, comps in POOLS:
        width = upper - lower
        w, ds = pool_parts(comps)
        u = np.array([pool_quantile(w, ds, p) for p in PROBS])
        assert np.all((u > 0) & (u < 1)), name
        a, b, sse = fit(u, PROBS)
        assert min(a, b) > 1.01e-6 and max(a, b) < 0.99e7, (name, a, b)
        max_err = largest_cdf_gap(w, [c[:2] for c in comps], a, b)
        m, sd = moments(w, ds)
        fb = stats.beta(a, b)
        bq = fb.ppf([0.05, 0.5, 0.95])
        pq = u[[4, 49, 94]]
        sd_ratio = fb.std() / sd
        int_ratio = (bq[2] - bq[0]) / (pq[2] - pq[0])
        for x, lim in ((max_err, POOR_FIT), (sd_ratio, SPREAD), (sd_ratio, 1 / SPREAD),
                       (int_ratio, SPREAD), (int_ratio, 1 / SPREAD)):
            assert abs(x - lim) > 1e-3, (name, x, lim)
        far = lambda r: int(not (1 / SPREAD <= r <= SPREAD))
        label = "|".join(f"{ca!r}:{cb!r}:{cw!r}" for ca, cb, cw in comps)
        vals = [a, b, sse, max_err, lower + width * m, width * sd, sd_ratio, int_ratio,
                *(width * (bq - pq))]
        print(f"{name},{lower!r},{upper!r},{label}," + ",".join(repr(float(v)) for v in vals)
              + f",{int(max_err > POOR_FIT)},{far(sd_ratio)},{far(int_ratio)}", flush=True)


if __name__ == "__main__":
    main()
