#!/usr/bin/python3
"""Reference values for Cooke's classical model, written apart from Parley.

Generated with Debian's python3-scipy; run from the repository root:

    /usr/bin/python3 testdata/scipy/classical_reference.py > testdata/scipy/classical_reference.csv

The model follows Cooke (1991), Experts in Uncertainty, ch. 12:
  - each question's intrinsic range [L*, U*] runs from the smallest of the
    experts' lowest quantiles and the realisation to the largest of their
    highest quantiles and the realisation, widened by k = 0.1 of its length
    on each side, and cut to the question's bounds where it has them;
  - an expert's calibration score is the chi-square tail
    P(chi2_{n-1} > 2 N I(s, p)), N the number of questions answered, s the
    share of realisations in each inter-quantile bin, p the bins' masses;
  - the information score is the mean over questions of the relative
    information of the minimal-information distribution (uniform between
    L*, the quantiles and U*) with respect to the uniform on [L*, U*];
  - weights are C * I * 1{C >= alpha}, normalised; the performance-weighted
    pool on a question mixes the experts' minimal-information distributions
    with those weights and is scored like an expert from its quantiles;
  - the bin masses are the differences of the probabilities as decimals
    (exact fractions of their shortest decimal), so equal bins are equal;
  - alpha, unless fixed, is the candidate among the experts' calibration
    scores that maximises the pool's C * I (ties to the smaller alpha),
    compared only among the candidates whose pool is scored on the most
    questions (a pool that no weighted expert answered a question for skips
    it; Parley's rule, no source: Cooke's model assumes every expert answers
    every question);
  - a question whose `background` cell is "log-uniform" is scored against the
    log-uniform background: every value (quantiles, realisation, bounds) is
    replaced by its natural logarithm before any of the above, so the
    intrinsic range, its widening and the minimal-information distributions
    are uniform in ln x; a lower bound of 0 becomes -inf and cuts nothing.

Reads the calibration CSVs named in FILES (header expert,question,
realization, optionally lower,upper, optionally background, then qNN columns;
# comments).

Columns: file,alpha_mode,who,calibration,information,weight
  alpha_mode  "optimised" or the fixed alpha
  who         an expert, "pooled" (weight empty) or "alpha" (the cut-off in
              the calibration column)
"""
import csv
import math
import sys
from fractions import Fraction

import numpy as np
import scipy
from scipy.stats import chi2

FILES = [
    "testdata/calibration/inverter_seeds.csv",
    "testdata/calibration/inverter_seeds_bounded.csv",
    "testdata/calibration/inverter_seeds_log.csv",
    "testdata/calibration/inverter_seeds_skipped.csv",
    "testdata/calibration/mirror_seeds.csv",
    "testdata/calibration/single_question_seeds.csv",
    "testdata/calibration/five_quantile_seeds.csv",
    "testdata/calibration/shared_median_seeds.csv",
]
K = 0.1


def load(path):
    rows = [r for r in open(path, encoding="utf-8") if not r.startswith("#")]
    rd = csv.reader(rows)
    hdr = [h.strip().lower() for h in next(rd)]
    has_bounds = hdr[3:5] == ["lower", "upper"]
    first = 5 if has_bounds else 3
    has_scale = hdr[first] == "background"
    if has_scale:
        first += 1
    probs = [float("0." + c[1:]) for c in hdr[first:]]
    data, real, bounds = {}, {}, {}
    for r in rd:
        if not r:
            continue
        log = has_scale and r[first - 1].strip().lower() == "log-uniform"
        ln = (lambda v: math.log(v) if v > 0 else -math.inf) if log else (lambda v: v)
        e, q, x = r[0].strip(), r[1].strip(), float(r[2])
        data[(e, q)] = [ln(float(v)) for v in r[first:]]
        real[q] = ln(x)
        if has_bounds and r[3].strip() != "":
            bounds[q] = (ln(float(r[3])), ln(float(r[4])))
    return probs, data, real, bounds


def model(probs, data, real, bounds, alpha=None):
    # Bin masses as the typed decimals' differences, exactly (0.95 - 0.5 is
    # 0.45, not the double 0.44999999999999996), so that bins of equal mass
    # are equal and mirrored counts score alike; math.fsum below sums
    # exactly rounded, whatever the order.
    edges = [Fraction(0)] + [Fraction(repr(v)) for v in probs] + [Fraction(1)]
    p = np.array([float(b - a) for a, b in zip(edges, edges[1:])])
    experts = sorted({e for e, _ in data})
    qs = sorted(real)
    rng = {}
    for q in qs:
        vals = [real[q]] + [v for (e, qq), a in data.items() if qq == q for v in (a[0], a[-1])]
        lo_, hi_ = min(vals), max(vals)
        w = hi_ - lo_
        lo, hi = lo_ - K * w, hi_ + K * w
        if q in bounds:
            lo, hi = max(lo, bounds[q][0]), min(hi, bounds[q][1])
        rng[q] = (lo, hi)

    def info(a, q):
        lo, hi = rng[q]
        x = [lo] + list(a) + [hi]
        return math.fsum(p[j] * math.log(p[j] / ((x[j + 1] - x[j]) / (hi - lo))) for j in range(len(p)))

    def bin_of(a, x):
        return sum(1 for v in a if v < x)

    def cal(counts):
        n = sum(counts)
        s = np.array(counts) / n
        rel = math.fsum(s[j] * math.log(s[j] / p[j]) for j in range(len(p)) if s[j] > 0)
        return chi2.sf(2 * n * rel, len(p) - 1)

    sc = {}
    for e in experts:
        c, inf, n = [0] * len(p), [], 0
        for q in qs:
            if (e, q) in data:
                a = data[(e, q)]
                c[bin_of(a, real[q])] += 1
                inf.append(info(a, q))
                n += 1
        C, I = cal(c), math.fsum(inf) / n
        sc[e] = (C, I)

    def pooled(w):
        c, inf = [0] * len(p), []
        for q in qs:
            lo, hi = rng[q]
            ans = [(w[e], data[(e, q)]) for e in experts if (e, q) in data and w[e] > 0]
            if not ans:
                continue
            tot = sum(x for x, _ in ans)
            grid = np.unique(np.concatenate([[lo, hi]] + [a for _, a in ans]))
            F = sum(wi / tot * np.interp(grid, [lo] + a + [hi], [0.0] + probs + [1.0]) for wi, a in ans)
            dq = [float(np.interp(pp, F, grid)) for pp in probs]
            c[bin_of(dq, real[q])] += 1
            inf.append(info(dq, q))
        return cal(c), math.fsum(inf) / len(inf), len(inf)

    def weights(a):
        w = {e: (sc[e][0] * sc[e][1] if sc[e][0] >= a else 0.0) for e in experts}
        t = math.fsum(w.values())
        return {e: v / t for e, v in w.items()}

    if alpha is None:
        tried = [(a,) + pooled(weights(a)) for a in sorted({sc[e][0] for e in experts})]
        most = max(n for _, _, _, n in tried)
        best = None
        for a, C, I, n in tried:
            if n == most and (best is None or C * I > best[1]):
                best = (a, C * I)
        alpha = best[0]
    w = weights(alpha)
    return alpha, sc, w, pooled(w)[:2]


def main():
    out = csv.writer(sys.stdout, lineterminator="\n")
    print("# scipy %s, numpy %s, python %s; generated by testdata/scipy/classical_reference.py"
          % (scipy.__version__, np.__version__, sys.version.split()[0]))
    out.writerow(["file", "alpha_mode", "who", "calibration", "information", "weight"])
    for path in FILES:
        probs, data, real, bounds = load(path)
        for fixed in (None, 0.1):
            mode = "optimised" if fixed is None else repr(fixed)
            a, sc, w, (pc, pi) = model(probs, data, real, bounds, fixed)
            out.writerow([path, mode, "alpha", repr(float(a)), "", ""])
            for e in sorted(sc):
                out.writerow([path, mode, e, repr(float(sc[e][0])), repr(float(sc[e][1])), repr(float(w[e]))])
            out.writerow([path, mode, "pooled", repr(float(pc)), repr(float(pi)), ""])


if __name__ == "__main__":
    main()
