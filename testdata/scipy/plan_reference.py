#!/usr/bin/python3
"""Reference values for elicit's study planning, by brute-force enumeration.

Generated with Debian's python3-scipy; run from the repository root:

    /usr/bin/python3 testdata/scipy/plan_reference.py > testdata/scipy/plan_reference.csv

Every value is a plain sum or maximum over all n + 1 outcomes x of a study
of n trials, with the beta-binomial prior predictive from
scipy.stats.betabinom and the posterior Beta(A + x, B + n - x) from
scipy.special (betainc, betaincinv). Nothing is truncated and nothing is
bisected: the smallest n is found by trying n = 1, 2, 3, ... in turn.

Columns: kind,alpha,beta,n,spec,value,extra
  predictive   P(X = x) with x in `spec`: scipy.stats.betabinom(n, A, B).pmf(x)
  assurance    spec = "T:direction:G"; value = sum over x of P(X = x) times
               1[P(theta < T | x) >= G] (below) or 1[P(theta > T | x) >= G]
               (above), P(theta < T | x) = betainc(A + x, B + n - x, T);
               extra = "from:to", the successful outcomes (from > to if none).
               The script checks that no outcome's posterior probability
               lies within 1e-9 of G, so the indicator is not a rounding tie.
  criterion    spec = "criterion:interval:level:length:trim"; value = the
               criterion at n:
                 alc  sum_x P(X = x) w(x), w the width of the posterior
                      interval with coverage `level`
                 acc  sum_x P(X = x) c(x), c the coverage of the posterior
                      interval of width `length`
                 woc  max_x w(x) over the outcomes kept after trimming the
                      least likely ones of total probability at most `trim`
                      (taken from the least likely up, ties larger x first)
               Intervals, equal ("equal"): at a coverage, betaincinv at
               (1 -+ level)/2; at a width l, [c, c + l] with equal tails,
               c by scipy.optimize.brentq. Highest density ("hpd"): the
               interval whose ends have equal density (Box & Tiao 1973,
               section 2.8): at a coverage, brentq over the lower tail mass
               t on the log densities at betaincinv(t) and
               betaincinv(t + level); at a width l, brentq over the start c
               on the log densities at c and c + l. Against a bound
               (a <= 1 or b <= 1) the interval starts at it. When a > b the
               width or coverage is computed for 1 - X ~ Beta(b, a), which
               has the same, and whose ends near 0 keep their precision.
  samplesize   spec as criterion; n = the smallest n >= 1 meeting the goal
               (alc, woc: value <= length; acc: value >= level), found by
               trying every n from 1; value = the criterion there; extra =
               the first n in N+1 .. 2N+10 that fails the goal again, or 0.
               Criterion rows are given for n = 1, 2, 3, N - 1 ... N + 3 and
               that first failing n.
The priors, thresholds and goals are invented test cases.
"""
import math
import sys

import numpy as np
import scipy
from scipy import optimize, special, stats


def row(kind, a, b, n, spec, value, extra=""):
    print(f"{kind},{a!r},{b!r},{n},{spec},{float(value)!r},{extra}")


def pmf(A, B, n):
    return stats.betabinom(n, A, B).pmf(np.arange(n + 1))


def logpdf(a, b, x):
    return (a - 1) * math.log(x) + (b - 1) * math.log1p(-x)


def falling_root(f, lo, hi):
    """Root of a falling f on (lo, hi) by brentq, from a bracket that
    starts 1e-8 of the span inside each end and moves out towards the ends
    while f keeps its sign there."""
    span = hi - lo
    a, b = lo + 1e-8 * span, hi - 1e-8 * span
    while f(a) < 0:
        a = lo + (a - lo) * 1e-4
    while f(b) > 0:
        b = hi - (hi - b) * 1e-4
    return optimize.brentq(f, a, b, xtol=1e-300, rtol=8.9e-16, maxiter=2000)


def eq_widths(a, b, level):
    t = (1 - level) / 2
    return special.betaincinv(a, b, 1 - t) - special.betaincinv(a, b, t)


def hpd_width(a, b, level):
    if a > b:  # the same width for 1 - X, whose ends near 0 keep their precision
        return hpd_width(b, a, level)
    q = lambda p: special.betaincinv(a, b, p)
    if a == 1 and b == 1:
        return level
    if a <= 1 and b >= 1:
        return q(level)
    if b <= 1 and a >= 1:
        return 1 - q(1 - level)
    if a < 1 and b < 1:
        return min(q(level), 1 - q(1 - level))
    # Box & Tiao's condition for the shortest interval: equal density at
    # both ends, in the lower tail mass t; the log-density difference falls
    # with t for a log-concave density.
    foc = lambda t: logpdf(a, b, q(t + level)) - logpdf(a, b, q(t))
    t = falling_root(foc, 0, 1 - level)
    return q(t + level) - q(t)


def cover(a, b, c, l):
    # 1 - F(c) - S(c + l)
    return 1 - special.betainc(a, b, c) - special.betainc(b, a, 1 - c - l)


def eq_coverage(a, b, l):
    if a > b:  # the same coverage for 1 - X
        return eq_coverage(b, a, l)
    h = lambda c: special.betainc(a, b, c) - special.betainc(b, a, 1 - c - l)
    # The root in log c: an absolute tolerance on c itself cannot find a
    # root far below it (c = 2.6e-25 for Beta(0.05, 4) and l = 0.05), and
    # near 0 the coverage with a small a moves with c**a.
    lo = 1e-300
    if h(lo) >= 0:  # the lower end at 0 to double precision
        return cover(a, b, 0, l)
    u = optimize.brentq(lambda u: h(math.exp(u)), math.log(lo), math.log(1 - l), xtol=1e-15, rtol=8.9e-16, maxiter=500)
    return cover(a, b, math.exp(u), l)


def hpd_coverage(a, b, l):
    if a > b:  # the same coverage for 1 - X
        return hpd_coverage(b, a, l)
    if a == 1 and b == 1:
        return l
    if a <= 1 and b >= 1:
        return cover(a, b, 0, l)
    if b <= 1 and a >= 1:
        return cover(a, b, 1 - l, l)
    if a < 1 and b < 1:
        return max(cover(a, b, 0, l), cover(a, b, 1 - l, l))
    # The [c, c + l] with most probability has equal density at its ends.
    foc = lambda c: logpdf(a, b, c + l) - logpdf(a, b, c)
    c = falling_root(foc, 0, 1 - l)
    return cover(a, b, c, l)


def kept(p, trim):
    keep = np.ones(len(p), dtype=bool)
    if trim == 0:
        return keep
    order = sorted(range(len(p)), key=lambda i: (p[i], -i))
    dropped = []
    for i in order[:-1]:
        dropped.append(p[i])
        if math.fsum(dropped) > trim:
            break
        keep[i] = False
    return keep


def criterion(A, B, crit, kind, level, l, trim, n, analysis=None):
    """The criterion at n, outcomes drawn from Beta(A, B); each outcome's
    interval is of the posterior under `analysis`, a pair (a0, b0), or
    under Beta(A, B) itself when it is None."""
    a0, b0 = analysis if analysis else (A, B)
    x = np.arange(n + 1)
    p = pmf(A, B, n)
    a, b = a0 + x, b0 + n - x
    if crit in ("alc", "woc"):
        if kind == "equal":
            w = eq_widths(a, b, level)
        else:
            w = np.array([hpd_width(ai, bi, level) for ai, bi in zip(a, b)])
        if crit == "alc":
            return math.fsum(p * w)
        return float(np.max(w[kept(p, trim)]))
    f = eq_coverage if kind == "equal" else hpd_coverage
    return math.fsum(pi * f(ai, bi, l) for pi, ai, bi in zip(p, a, b))


def met(crit, level, l, v):
    return v >= level if crit == "acc" else v <= l


def smallest_n(A, B, crit, kind, level, l, trim, analysis=None):
    """Tries n = 1, 2, 3, ... until the goal is met (N), then N + 1 ..
    2N + 10 until it fails again (again, 0 if it does not). Returns the
    criterion at every n tried, N and again."""
    value = {}
    n = 1
    while True:
        value[n] = criterion(A, B, crit, kind, level, l, trim, n, analysis)
        if met(crit, level, l, value[n]):
            break
        n += 1
    N = n
    again = 0
    for m in range(N + 1, 2 * N + 11):
        value[m] = criterion(A, B, crit, kind, level, l, trim, m, analysis)
        if not met(crit, level, l, value[m]):
            again = m
            break
    return value, N, again


def shown(value, N, again):
    """The n whose criterion rows are written: 1, 2, 3, N - 1 .. N + 3 and
    the first that fails again."""
    return [m for m in sorted(value) if m <= 3 or N - 1 <= m <= N + 3 or m == again]


def assurance(A, B, n, T, direction, G, analysis=None):
    """Outcomes drawn from Beta(A, B), success judged on the posterior
    under `analysis`, a pair (a0, b0), or under Beta(A, B) when None."""
    a0, b0 = analysis if analysis else (A, B)
    p = pmf(A, B, n)
    x = np.arange(n + 1)
    if direction == "below":
        post = special.betainc(a0 + x, b0 + n - x, T)
    else:
        post = special.betainc(b0 + n - x, a0 + x, 1 - T)
    assert np.all(np.abs(post - G) > 1e-9), (A, B, n, T, direction, G, analysis)
    ok = post >= G
    xs = x[ok]
    span = f"{xs.min()}:{xs.max()}" if len(xs) else ("0:-1" if direction == "below" else f"{n + 1}:{n}")
    return math.fsum(p[ok]), span


def main():
    print(f"# scipy {scipy.__version__}, numpy {np.__version__}, python {sys.version.split()[0]}; "
          "generated by testdata/scipy/plan_reference.py")
    print("kind,alpha,beta,n,spec,value,extra")

    # Prior predictive.
    for A, B, n in [(2.0, 38.0, 50), (5.677, 76.54, 200), (0.5, 0.5, 30)]:
        for x, v in enumerate(pmf(A, B, n)):
            row("predictive", A, B, n, x, v)
    for A, B, n in [(1.0, 1.0, 2000), (3.0, 10000.0, 100000)]:
        p = pmf(A, B, n)
        for x in sorted({0, 1, 2, 10, 30, n // 2, n - 1, n}):
            row("predictive", A, B, n, x, p[x])

    # Assurance.
    for A, B, n, T, direction, G in [
        (2.0, 38.0, 100, 0.08, "below", 0.95),
        (5.677, 76.54, 300, 0.1, "below", 0.9),
        (1.0, 1.0, 50, 0.5, "above", 0.975),
        (3.0, 7.0, 1000, 0.25, "above", 0.8),
        (0.5, 0.5, 20, 0.3, "below", 0.5),
        (2.0, 38.0, 10, 0.01, "below", 0.99),
        (1.0, 199.0, 100, 0.05, "below", 0.9),
    ]:
        v, span = assurance(A, B, n, T, direction, G)
        row("assurance", A, B, n, f"{T!r}:{direction}:{G!r}", v, span)
    for n in range(1, 121):
        v, span = assurance(2.0, 38.0, n, 0.08, "below", 0.95)
        row("assurance", 2.0, 38.0, n, "0.08:below:0.95", v, span)

    # Sample size: every n from 1 until the goal is met.
    goals = [
        (1.0, 1.0, "alc", "equal", 0.95, 0.1, 0.0),
        (2.0, 38.0, "alc", "equal", 0.95, 0.04, 0.0),
        (2.0, 38.0, "alc", "hpd", 0.95, 0.06, 0.0),
        (2.0, 38.0, "acc", "equal", 0.95, 0.06, 0.0),
        (2.0, 38.0, "acc", "hpd", 0.9, 0.06, 0.0),
        (1.0, 1.0, "woc", "equal", 0.95, 0.2, 0.0),
        (1.0, 1.0, "woc", "hpd", 0.9, 0.25, 0.0),
        (2.0, 38.0, "woc", "equal", 0.95, 0.2, 0.0),
        (0.1, 20.0, "alc", "equal", 0.5, 0.0025, 0.0),
        (2.0, 38.0, "woc", "equal", 0.95, 0.1, 0.05),
        (2.0, 38.0, "woc", "equal", 0.9, 0.1, 0.05),
        (3.0, 1.0, "acc", "hpd", 0.8, 0.2, 0.0),
        (0.5, 0.5, "alc", "hpd", 0.9, 0.3, 0.0),
        (1.0, 9.0, "alc", "hpd", 0.95, 0.08, 0.0),
    ]
    for A, B, crit, kind, level, l, trim in goals:
        spec = f"{crit}:{kind}:{level!r}:{l!r}:{trim!r}"
        print(f"goal {A} {B} {spec}", file=sys.stderr)
        value, N, again = smallest_n(A, B, crit, kind, level, l, trim)
        for m in shown(value, N, again):
            row("criterion", A, B, m, spec, value[m])
        row("samplesize", A, B, N, spec, value[N], again)

    # Coverage where the equal-tailed interval's lower end lies far below
    # 1e-16 (8.2e-27 for the posterior Beta(0.05, 5) at length 0.05),
    # which eq_coverage solves in log c; at n = 1 the posterior after no
    # success is that Beta.
    for n in (1, 2, 5):
        spec = "acc:equal:0.95:0.05:0.0"
        row("criterion", 0.05, 4.0, n, spec, criterion(0.05, 4.0, "acc", "equal", 0.95, 0.05, 0.0, n))


if __name__ == "__main__":
    main()
