#!/usr/bin/python3
"""Global least-squares Beta fits to random judgements, by a multi-start search.

For elicit's TestFitGlobalReference: the judgements are drawn here (our own
invented random judgements, not data from anywhere), and for each the smallest

    S(a, b) = sum_i (betainc(a, b, u_i) - p_i)^2,   u_i = (x_i - lower)/(upper - lower)

over the box 1e-6 <= a, b <= 1e7 (elicit.MinShape, elicit.MaxShape) is searched
in two stages: S on a lattice of log a and log b spaced 0.25 over the whole
box (about 16,000 points), then scipy.optimize.least_squares (trust-region
reflective, bounded, in log a and log b) from every local minimum of the
lattice (at most the 24 lowest) and its 12 lowest points. The best is polished once more with tight
tolerances. SciPy's betainc is Boost's incomplete beta function, independent
of elicit's.

Generated with Debian's python3-scipy; run from the repository root:

    /usr/bin/python3 testdata/scipy/fit_global_reference.py > testdata/scipy/fit_global_reference.csv

Columns: kind,probs,values,lower,upper,alpha,beta,sse,at_edge
  kind      the family the judgement was drawn from
  probs, values  the judgement, ";"-separated
  alpha, beta    the best point found; sse its objective
  at_edge   1 when the best point lies on the edge of the box (the data want
            a Beta beyond it; elicit refuses such judgements with RuleFitRange)
"""
import math
import sys

import numpy as np
import scipy
from scipy import optimize, special

LO, HI = math.log(1e-6), math.log(1e7)
rng = np.random.default_rng(20261202)


def objective_parts(u, p):
    def resid(th):
        a, b = math.exp(th[0]), math.exp(th[1])
        return special.betainc(a, b, u) - p
    return resid


# The grid of starts: log a and log b on a 0.25-spaced lattice over the box.
GRID = np.linspace(LO, HI, int(round((HI - LO) / 0.25)) + 1)


def fit(u, p):
    resid = objective_parts(u, p)
    a = np.exp(GRID)[:, None, None]
    b = np.exp(GRID)[None, :, None]
    s_grid = np.sum((special.betainc(a, b, u[None, None, :]) - p[None, None, :]) ** 2, axis=2)
    # Starts: the 24 lowest local minima of the lattice (no lower neighbour
    # of the eight; plateaus where every F is 0 or 1 make many) and the 12
    # lowest points.
    pad = np.pad(s_grid, 1, constant_values=np.inf)
    low = np.ones_like(s_grid, dtype=bool)
    for di in (-1, 0, 1):
        for dj in (-1, 0, 1):
            if di or dj:
                low &= s_grid <= pad[1 + di:1 + di + s_grid.shape[0], 1 + dj:1 + dj + s_grid.shape[1]]
    mins = list(zip(*np.nonzero(low)))
    mins.sort(key=lambda ij: s_grid[ij])
    starts = set(mins[:24])
    starts |= set(zip(*np.unravel_index(np.argsort(s_grid, axis=None)[:12], s_grid.shape)))
    best = None
    for i, j in starts:
        th0 = np.array([GRID[i], GRID[j]])
        r = optimize.least_squares(resid, th0, bounds=([LO, LO], [HI, HI]), method="trf",
                                   xtol=1e-14, ftol=1e-14, gtol=1e-14, max_nfev=1000)
        s = float(np.sum(r.fun ** 2))
        if best is None or s < best[1]:
            best = (r.x, s)
    r = optimize.least_squares(resid, best[0], bounds=([LO, LO], [HI, HI]), method="trf",
                               xtol=1e-15, ftol=1e-15, gtol=1e-15, max_nfev=2000)
    s = float(np.sum(r.fun ** 2))
    if s < best[1]:
        best = (r.x, s)
    return best


def ok_values(u):
    """elicit's value rules: 1e-10 from the bounds, a millionth apart (relative)."""
    if any(not (1e-10 <= x <= 1 - 1e-10) for x in u):
        return False
    for a, b in zip(u, u[1:]):
        near = min(a, 1 - a, b, 1 - b)
        if not (b - a >= 1e-6 * near * 1.01):
            return False
    return True


def draw(kind):
    n = int(rng.integers(2, 10))
    if kind == "ordinary":
        a, b = np.exp(rng.uniform(math.log(0.5), math.log(200), 2))
    elif kind == "rare":
        a = math.exp(rng.uniform(math.log(0.3), math.log(30)))
        b = a / math.exp(rng.uniform(math.log(1e-7), math.log(1e-2)))
    elif kind == "near_certain":
        m = rng.uniform(0.02, 0.98)
        ess = math.exp(rng.uniform(math.log(1e3), math.log(1e6)))
        a, b = m * ess, (1 - m) * ess
    elif kind == "u_shape":
        a, b = np.exp(rng.uniform(math.log(0.05), math.log(0.9), 2))
    elif kind == "j_shape":
        a = math.exp(rng.uniform(math.log(0.1), math.log(0.95)))
        b = math.exp(rng.uniform(math.log(1.2), math.log(500)))
        if rng.random() < 0.5:
            a, b = b, a
    else:  # close pairs and scaled bounds start from an ordinary Beta
        a, b = np.exp(rng.uniform(math.log(0.5), math.log(300), 2))
    if kind in ("u_shape",):
        ps = np.sort(rng.uniform(0.05, 0.95, n))
    else:
        ps = np.sort(rng.uniform(0.01, 0.99, n))
    ps = np.round(ps, 3)
    if len(set(ps)) < n or ps[0] <= 0 or ps[-1] >= 1:
        return None
    u = special.betaincinv(a, b, ps)
    # An expert's values are the Beta's quantiles moved by noise on the
    # logit scale (none for two pairs sometimes, so exact fits appear too).
    noise = 0.0 if (n == 2 and rng.random() < 0.3) else rng.uniform(0.02, 0.6)
    lu = np.log(u) - np.log1p(-u) + noise * rng.standard_normal(n)
    u = np.sort(1 / (1 + np.exp(-lu)))
    if kind == "close_pair" and n >= 3:
        i = int(rng.integers(0, n - 1))
        gap = math.exp(rng.uniform(math.log(1e-4), math.log(2e-2)))
        u[i + 1] = u[i] + gap * min(u[i], 1 - u[i])
        u = np.sort(u)
    u = np.array([float("%.6g" % x) for x in u])
    if not ok_values(list(u)) or len(set(u)) < n:
        return None
    lower, upper = 0.0, 1.0
    if kind == "scaled":
        lower = float("%.4g" % rng.uniform(-100, 100))
        upper = float("%.4g" % (lower + math.exp(rng.uniform(math.log(0.5), math.log(1e5)))))
        x = [float("%.10g" % (lower + (upper - lower) * v)) for v in u]
        u2 = [(v - lower) / (upper - lower) for v in x]
        if not ok_values(u2) or not all(lower < v < upper for v in x) or sorted(set(x)) != x:
            return None
        return kind, list(ps), x, lower, upper, np.array(u2)
    return kind, list(ps), list(u), lower, upper, u


kinds = {"ordinary": 300, "rare": 180, "near_certain": 120, "u_shape": 120,
         "j_shape": 160, "close_pair": 120, "scaled": 100}
print(f"# scipy {scipy.__version__}, numpy {np.__version__}, python {sys.version.split()[0]}; "
      "generated by testdata/scipy/fit_global_reference.py")
print("kind,probs,values,lower,upper,alpha,beta,sse,at_edge")
for kind, count in kinds.items():
    done = 0
    while done < count:
        d = draw(kind)
        if d is None:
            continue
        kind_, ps, xs, lower, upper, u = d
        th, s = fit(np.array(u), np.array(ps))
        edge = int(min(th[0] - LO, HI - th[0], th[1] - LO, HI - th[1]) < 1e-6)
        print(f"{kind_},{';'.join(repr(float(p)) for p in ps)},{';'.join(repr(float(x)) for x in xs)},"
              f"{lower!r},{upper!r},{math.exp(th[0])!r},{math.exp(th[1])!r},{s!r},{edge}", flush=True)
        done += 1
