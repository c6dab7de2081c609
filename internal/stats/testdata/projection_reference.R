# Reference values for internal/stats normal_test.go, model_test.go,
# bootstrap_test.go and projection_test.go.
# Run: Rscript internal/stats/testdata/projection_reference.R
# Produced with: R version 4.2.2 Patched (2022-11-10 r83330), Debian r-base-core.
p <- function(label, x) cat(sprintf("%-40s %s\n", label, paste(sprintf("%.17g", x), collapse = " ")))

# Standard normal quantiles and upper tails.
p("qnorm(0.975)", qnorm(0.975))
p("qnorm(0.9)", qnorm(0.9))
p("qnorm(0.95)", qnorm(0.95))
p("qnorm(0.995)", qnorm(0.995))
p("qnorm(0.1)", qnorm(0.1))
p("qnorm(1e-10)", qnorm(1e-10))
p("pnorm(1.5, lower.tail=FALSE)", pnorm(1.5, lower.tail = FALSE))
p("pnorm(-2, lower.tail=FALSE)", pnorm(-2, lower.tail = FALSE))
p("pnorm(8, lower.tail=FALSE)", pnorm(8, lower.tail = FALSE))

# Hand-checkable projection (projection_test.go): 8-h shift, 8-h windows,
# direct care 0.5, tier a = c(10,20,30) with 2 patients, b = c(50,70) with 3,
# c with 0 patients and no observations.
a <- c(10, 20, 30); b <- c(50, 70); na <- 2; nb <- 3
mu <- na * mean(a) + nb * mean(b)
vp <- na * var(a) + nb * var(b)
ve <- na^2 * var(a) / length(a) + nb^2 * var(b) / length(b)
s <- sqrt(vp + ve)
p("hand mu, vp, ve, sd", c(mu, vp, ve, s))
p("hand band 0.8 low, high", mu + c(-1, 1) * qnorm(0.9) * s)
p("hand cover 0.9 minutes", mu + qnorm(0.9) * s)
p("hand cover nurses", (mu + qnorm(0.9) * s) / 60 / 0.5 / 8)
cap <- (0:3) * 8 * 60 * 0.5
p("hand shortfall N=0..3", pnorm((cap - mu) / s, lower.tail = FALSE))

# Domain brief 1.6 illustrative numbers (a [D] derivation there), recomputed.
n <- c(10, 8, 4); m <- c(1.5, 3, 6); sg <- c(0.6, 1.2, 2.5); obs <- 30
E <- sum(n * m); v1 <- sum(n * sg^2); v2 <- sum(n^2 * sg^2 / obs)
p("brief E, sd, sd with estimate (h)", c(E, sqrt(v1), sqrt(v1 + v2)))
p("brief q90 nurses at 10.2 h", (E + qnorm(0.9) * sqrt(v1 + v2)) / 10.2)

# Type 7 quantiles (Hyndman & Fan 1996), R's default.
x <- c(3.5, 1, 7, 2, 2, 10, 4.25, 8)
p("quantile(x, c(.1,.5,.9,.95), type=7)", quantile(x, c(0.1, 0.5, 0.9, 0.95), type = 7, names = FALSE))
