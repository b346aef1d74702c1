# study_review_reference.R prints the R values that tests of the study side
# quote in their comments (a review of December 2026): each block names
# the test. Run from the repository root:
#   Rscript testdata/r/study_review_reference.R > testdata/r/study_review_reference.txt
# The priors are our own invented extremes.

options(digits = 17)
cat("#", R.version.string, "\n")

# elicit.TestHDIAtATinyLevelHoldsTheMode: the density at the mode
# (alpha - 1)/(alpha + beta - 2).
cat("dbeta(0.4, 3, 4) =", dbeta(0.4, 3, 4), "\n")
m <- (1e6 - 1) / (4e6 - 2)
cat("mode of Beta(1e6, 3e6) =", m, "; dbeta there =", dbeta(m, 1e6, 3e6), "\n")

# elicit.TestConflictTailBelowTheSmallestDouble, web's
# TestStudyConflictTailBelowTheSmallestDouble: log10 P(Y = 0) for 0
# successes in 1000 trials under Beta(1e6, 1), the whole lower tail.
cat("log10 P(Y <= 0 | Beta(1e6, 1), n = 1000) =", (lbeta(1e6, 1001) - lbeta(1e6, 1)) / log(10), "\n")

# elicit.TestCriterionBeyondMaxShape: the expected width of the 95%
# equal-tailed posterior intervals under Beta(1e7, 1e7), over the outcomes
# of n trials (at n = 1e5 those of predictive probability above 1e-18).
alc <- function(a, b, n) {
  x <- 0:n
  pmf <- exp(lchoose(n, x) + lbeta(a + x, b + n - x) - lbeta(a, b))
  k <- pmf > 1e-18
  sum(pmf[k] * (qbeta(0.975, a + x[k], b + n - x[k]) - qbeta(0.025, a + x[k], b + n - x[k])))
}
cat("ALC, Beta(1e7, 1e7), n = 1:", alc(1e7, 1e7, 1), "\n")
cat("ALC, Beta(1e7, 1e7), n = 1e5:", alc(1e7, 1e7, 1e5), "\n")

# web's TestQuickPriorsTellTheCoveragesApart: the moment match of the
# central 90% interval [0.4, 0.6] and the probability it gives there.
sd <- 0.1 / qnorm(0.95)
a <- 0.5 * (0.25 / sd^2 - 1)
cat("moment match of [0.4, 0.6] at 90%: alpha = beta =", a, "; coverage =", pbeta(0.6, a, a) - pbeta(0.4, a, a), "\n")
