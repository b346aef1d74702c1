#!/usr/bin/python3
"""Reference values for assurance with a design and an analysis prior, by
brute-force enumeration.

Generated with Debian's python3-scipy; run from the repository root:

    /usr/bin/python3 testdata/scipy/two_prior_assurance_reference.py > testdata/scipy/two_prior_assurance_reference.csv

The outcomes of a study of n trials are drawn from the design prior
Beta(A, B): P(X = x) = scipy.stats.betabinom(n, A, B).pmf(x). Success is
judged on the posterior under the analysis prior Beta(a, b):
P(theta < T | x) = scipy.special.betainc(a + x, b + n - x, T) (below) or
P(theta > T | x) = betainc(b + n - x, a + x, 1 - T) (above), at least G.
assurance = sum over every x = 0..n of P(X = x) times that indicator
(O'Hagan & Stevens 2001, Med. Decis. Making 21(3), with the design and
analysis priors; Wang & Gelfand 2002's sampling and fitting priors).
Nothing is truncated or bisected; the script checks that no outcome's
posterior probability lies within 1e-9 of G, so no indicator is a
rounding tie.

Columns: A,B,a,b,n,spec,value,span
  spec  "T:direction:G"
  span  "from:to", the successful outcomes (from > to when none)
The priors, thresholds and goals are invented test cases: a planning
prior elicited for an invented proportion (a new inverter model's
first-year failures, a response rate) with a uniform, Jeffreys,
sceptical or enthusiastic analysis prior.
"""
import math
import sys

import numpy as np
import scipy
from scipy import special, stats


def assurance(A, B, a, b, n, T, direction, G):
    p = stats.betabinom(n, A, B).pmf(np.arange(n + 1))
    x = np.arange(n + 1)
    if direction == "below":
        post = special.betainc(a + x, b + n - x, T)
    else:
        post = special.betainc(b + n - x, a + x, 1 - T)
    assert np.all(np.abs(post - G) > 1e-9), (A, B, a, b, n, T, direction, G)
    ok = post >= G
    xs = x[ok]
    span = f"{xs.min()}:{xs.max()}" if len(xs) else ("0:-1" if direction == "below" else f"{n + 1}:{n}")
    return math.fsum(p[ok]), span


def row(A, B, a, b, n, T, direction, G):
    v, span = assurance(A, B, a, b, n, T, direction, G)
    print(f"{A!r},{B!r},{a!r},{b!r},{n},{T!r}:{direction}:{G!r},{float(v)!r},{span}")


print(f"# scipy {scipy.__version__}")
print("A,B,a,b,n,spec,value,span")
for case in [
    # Elicited design prior, uniform analysis prior.
    (2.0, 38.0, 1.0, 1.0, 100, 0.08, "below", 0.95),
    (2.0, 38.0, 1.0, 1.0, 5, 0.08, "below", 0.95),  # no outcome succeeds
    (5.677, 76.54, 0.5, 0.5, 300, 0.1, "below", 0.9),  # Jeffreys analysis
    (3.0, 7.0, 1.0, 1.0, 1000, 0.25, "above", 0.8),
    # Enthusiastic design, sceptical analysis, and the other way round.
    (8.0, 2.0, 2.0, 8.0, 60, 0.5, "above", 0.975),
    (2.0, 8.0, 8.0, 2.0, 60, 0.5, "above", 0.975),
    # Uniform design, informative analysis.
    (1.0, 1.0, 20.0, 180.0, 200, 0.1, "below", 0.95),
    # The same prior in both roles: Assurance's own case.
    (2.0, 38.0, 2.0, 38.0, 100, 0.08, "below", 0.95),
]:
    row(*case)
# A curve over n = 1..120: an elicited design prior, a uniform analysis.
for n in range(1, 121):
    row(2.0, 38.0, 1.0, 1.0, n, 0.08, "below", 0.95)
