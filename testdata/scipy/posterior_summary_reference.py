#!/usr/bin/python3
"""The study page's numbers, worked apart from Parley: the posterior summary
after recorded batches of binomial data, the prior-data conflict check, and
the prior predictive's mean and sd for a planned study.

For elicit/workshop's TestStudyUpdateAgainstSciPy (study_reference_test.go:
workshop.StudyUpdate, which the study page, the report, the record and
`parley update` show) and elicit's TestPredictiveMomentsAgainstExact
(elicit.PredictiveMoments, the study plan's "expected successes").

Generated with Debian's python3-scipy (1.10.1); run from the repository root:

    /usr/bin/python3 testdata/scipy/posterior_summary_reference.py > testdata/scipy/posterior_summary_reference.csv

For each invented case, a Beta(a, b) prior and batches of s successes in n
trials:
  - the batches are summed, S and N, and the posterior is Beta(a + S,
    b + N - S) (Gelman et al. 2013, "Bayesian Data Analysis", 3rd ed.,
    sec. 2.4); where the posterior is not too sharp for it, the script
    checks that posterior's mean against scipy.integrate.quad of
    theta * prior(theta) * binom.pmf(S; N, theta), normalised (no
    conjugacy assumed);
  - mean and sd: scipy.stats.beta(A, B).mean(), .std();
  - the 95% equal-tailed interval: .ppf(0.025), .ppf(0.975);
  - the 95% highest-density interval: with A, B > 1, the shortest
    [ppf(t), ppf(t + 0.95)] by scipy.optimize.minimize_scalar, refined by
    brentq on pdf(ppf(t + 0.95)) = pdf(ppf(t)); with A <= 1 < B (density
    falling from 0) it is [0, ppf(0.95)], mirrored for B <= 1 < A;
  - the conflict check (Box 1980's prior predictive check): P(Y <= S) as
    scipy.stats.betabinom(N, a, b).cdf(S), P(Y >= S) as math.fsum of its
    pmf from S to N, and the two-sided min(1, 2 min(lower, upper));
  - for a planned study of n trials under the prior alone, the beta-binomial
    predictive's mean and sd in exact rational arithmetic (Python's
    fractions; the shapes are the doubles written, which are rationals):
    n a/(a + b) and n a b (a + b + n)/((a + b)^2 (a + b + 1)) (Johnson, Kemp
    & Kotz 2005, "Univariate Discrete Distributions", 3rd ed., sec. 6.7.2),
    and for n <= 1000 the same exactly from the definition, the sums of x
    and (x - mean)^2 times the probability of x over every outcome, each
    probability C(n, x) (a)_x (b)_(n-x) / (a + b)_n in exact arithmetic; the
    sd's square root to 40 digits (decimal), then rounded to a double. SciPy's
    own scipy.stats.betabinom(n, a, b).mean() and .std() are written too
    (scipy_pred_mean, scipy_pred_sd): its .std() loses digits where the mean
    dwarfs the sd (4e-11 relative under Beta(1e7, 3) with 1000 trials).

Columns: case,alpha,beta,batches,kind,value
  batches  "s:n|s:n|..." for the update rows; for the pred_mean and
           pred_sd rows, the planned n alone
  kind     post_alpha, post_beta, mean, sd, eqt_lo, eqt_hi, hdi_lo, hdi_hi,
           conflict_lower, conflict_upper, conflict_two_sided,
           pred_mean, pred_sd, scipy_pred_mean, scipy_pred_sd
"""
import decimal
import math
import sys
from fractions import Fraction

import numpy as np
import scipy
from scipy import integrate, optimize, stats

LEVEL = 0.95

# case, prior alpha, prior beta, batches [(s, n), ...]: invented studies.
CASES = [
    ("defect share in two batches", 3.0, 12.0, [(2, 10), (1, 5)]),
    ("agreed prior from a pool", 2.9505311711722633, 55.560337312905354, [(3, 120), (5, 80)]),
    ("uniform prior", 1.0, 1.0, [(7, 20)]),
    ("Jeffreys prior and no successes", 0.5, 0.5, [(0, 10), (0, 7)]),
    ("data in conflict", 30.0, 3.0, [(1, 40)]),
    ("rare event", 0.6, 2400.0, [(0, 500), (1, 1500), (0, 2000)]),
    ("all successes", 4.0, 1.5, [(25, 25)]),
    ("sharp prior and a large study", 4000.0, 6000.0, [(41000, 100000), (39500, 100000)]),
    ("vague prior and surprising data", 1.2, 8.0, [(9, 12)]),
]

# prior alpha, prior beta, planned trials
PLANS = [
    (2.0, 38.0, 100), (2.0, 38.0, 1), (0.5, 0.5, 50), (1.0, 1.0, 10),
    (30.0, 3.0, 400), (0.6, 2400.0, 10000), (4000.0, 6000.0, 1000000),
    (1e-6, 1e-6, 20), (1e7, 3.0, 1000),
]


def hdi(d, a, b):
    if a <= 1 < b:
        return 0.0, d.ppf(LEVEL)
    if b <= 1 < a:
        return d.ppf(1 - LEVEL), 1.0
    assert a > 1 and b > 1, (a, b)
    width = lambda t: d.ppf(t + LEVEL) - d.ppf(t)
    t = optimize.minimize_scalar(width, bounds=(0, 1 - LEVEL), method="bounded", options={"xatol": 1e-14}).x
    foc = lambda t: d.pdf(d.ppf(t + LEVEL)) - d.pdf(d.ppf(t))
    lo_t, hi_t = max(t - 1e-3, 1e-300), min(t + 1e-3, 1 - LEVEL - 1e-300)
    assert foc(lo_t) * foc(hi_t) < 0, (a, b, t)
    t = optimize.brentq(foc, lo_t, hi_t, xtol=1e-16, rtol=1e-15)
    return d.ppf(t), d.ppf(t + LEVEL)


def quad_mean(a, b, s, n):
    """The posterior mean by integration of prior times likelihood."""
    prior = stats.beta(a, b)
    post = lambda th: prior.pdf(th) * stats.binom.pmf(s, n, th)
    lo, hi = stats.beta(a + s, b + n - s).ppf([1e-12, 1 - 1e-12])
    pieces = np.linspace(lo, hi, 41)
    opts = dict(epsabs=0, epsrel=1e-13, limit=200)
    z = math.fsum(integrate.quad(post, x, y, **opts)[0] for x, y in zip(pieces, pieces[1:]))
    m = math.fsum(integrate.quad(lambda th: th * post(th), x, y, **opts)[0] for x, y in zip(pieces, pieces[1:]))
    return m / z


def exact_predictive_moments(a, b, n):
    """Mean and variance of the beta-binomial, exactly, as Fractions."""
    a, b, s = Fraction(a), Fraction(b), Fraction(a) + Fraction(b)
    mean = n * a / s
    var = n * a * b * (s + n) / (s * s * (s + 1))
    if n <= 1000:
        # P(X = 0) = (b)_n / (a + b)_n; P(X = x + 1) / P(X = x) =
        # (n - x)/(x + 1) * (a + x)/(b + n - x - 1).
        p = Fraction(1)
        for k in range(n):
            p *= (b + k) / (s + k)
        total, m1, m2 = Fraction(0), Fraction(0), Fraction(0)
        for x in range(n + 1):
            total += p
            m1 += x * p
            m2 += x * x * p
            if x < n:
                p *= Fraction(n - x, x + 1) * (a + x) / (b + n - x - 1)
        assert total == 1 and m1 == mean and m2 - m1 * m1 == var, (a, b, n)
    return mean, var


def exact_sqrt(q):
    decimal.getcontext().prec = 40
    return float((decimal.Decimal(q.numerator) / decimal.Decimal(q.denominator)).sqrt())


def main():
    print(f"# scipy {scipy.__version__}, numpy {np.__version__}, python {sys.version.split()[0]}; "
          "generated by testdata/scipy/posterior_summary_reference.py")
    print("case,alpha,beta,batches,kind,value")
    for name, a, b, batches in CASES:
        s, n = sum(x for x, _ in batches), sum(y for _, y in batches)
        A, B = a + s, b + n - s
        d = stats.beta(A, B)
        if min(a, b) >= 1 and n <= 1000:
            qm = quad_mean(a, b, s, n)
            assert abs(qm - d.mean()) <= 1e-10 * d.mean(), (name, qm, d.mean())
        head = f"{name},{a!r},{b!r}," + "|".join(f"{x}:{y}" for x, y in batches)
        pred = stats.betabinom(n, a, b)
        lower = pred.cdf(s)
        upper = math.fsum(pred.pmf(j) for j in range(s, n + 1))
        hlo, hhi = hdi(d, A, B)
        rows = [("post_alpha", A), ("post_beta", B), ("mean", d.mean()), ("sd", d.std()),
                ("eqt_lo", d.ppf((1 - LEVEL) / 2)), ("eqt_hi", d.ppf((1 + LEVEL) / 2)),
                ("hdi_lo", hlo), ("hdi_hi", hhi),
                ("conflict_lower", lower), ("conflict_upper", upper),
                ("conflict_two_sided", min(1.0, 2 * min(lower, upper)))]
        for kind, v in rows:
            print(f"{head},{kind},{float(v)!r}")
    for a, b, n in PLANS:
        pred = stats.betabinom(n, a, b)
        mean, var = exact_predictive_moments(a, b, n)
        head = f"planned study,{a!r},{b!r},{n}"
        print(f"{head},pred_mean,{float(mean)!r}")
        print(f"{head},pred_sd,{exact_sqrt(var)!r}")
        print(f"{head},scipy_pred_mean,{float(pred.mean())!r}")
        print(f"{head},scipy_pred_sd,{float(pred.std())!r}")


if __name__ == "__main__":
    main()
