# pool_held_bound_reference.R prints the distances from the bound of a
# linear pool's points that a double holds only as the bound, for
# elicit's Pool.BeyondDouble (TestPoolPointsHeldAsABoundAreSaid in
# elicit/pool_bound_test.go, where the printed values are written).
# Run: Rscript testdata/r/pool_held_bound_reference.R (R 4.2.2). The
# shapes are our own invented test cases.
#
# A: on [10, 20], the equal pool of Beta(0.0668198, 0.292528) and
#    Beta(0.05, 0.3); its 5% point, 10 u above 10, from R's own pbeta.
# B: on [0, 1], the equal pool of Beta(0.001, 0.001) and Beta(0.002,
#    0.001), whose 5% and 95% points lie far below the double range:
#    from the leading term x^a / (a B(a, b)) of each component (DLMF
#    8.17.8) the 5% point solves a quadratic in s = u^0.001 and the 95%
#    point (on the mirror images) a linear equation.
a1 <- 0.0668198; b1 <- 0.292528; a2 <- 0.05; b2 <- 0.3
f <- function(t) log(0.5*pbeta(exp(t), a1, b1) + 0.5*pbeta(exp(t), a2, b2)) - log(0.05)
r <- uniroot(f, c(-200, 0), tol = 1e-14)
cat(sprintf("A: 10*u = %.6e\n", 10*exp(r$root)))
# B: leading terms x^a/(a B(a,b)); mixture 0.5 c1 s + 0.5 c2 s^2 = 0.05, s = u^0.001
c1 <- exp(-log(0.001) - lbeta(0.001, 0.001)); c2 <- exp(-log(0.002) - lbeta(0.002, 0.001))
s <- (-0.5*c1 + sqrt((0.5*c1)^2 + 4*0.5*c2*0.05)) / (2*0.5*c2)
lu <- 1000*log(s)
cat(sprintf("B low: log10 u = %.6f\n", lu/log(10)))
d1 <- exp(-log(0.001) - lbeta(0.001, 0.001)); d2 <- exp(-log(0.001) - lbeta(0.001, 0.002))
lv <- 1000*log(0.05/(0.5*d1 + 0.5*d2))
cat(sprintf("B high: log10 (1-u) = %.6f\n", lv/log(10)))
# B's median lies in the upper spike too: 1 - u solves the same linear
# equation with 0.5 for 0.05 (its nearest double is 1; Parley had shown
# the last double below 1 until the quantile in that gap was decided by
# where it lies in u).
lm <- 1000*log(0.5/(0.5*d1 + 0.5*d2))
cat(sprintf("B median: log10 (1-u) = %.6f\n", lm/log(10)))
