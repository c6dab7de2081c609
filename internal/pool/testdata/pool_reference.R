# Reference values for internal/pool (R 4.2.2). Run: Rscript testdata/pool_reference.R
# Each ward's need is a Poisson or shifted binomial headcount, truncated at `top`
# (the rest is "beyond"); excess X = max(0, need - staff); S = sum of X by convolve().
pool <- function(pmfs, staff, cover) {
  ex <- lapply(seq_along(pmfs), function(w) {
    p <- pmfs[[w]]; n <- seq_along(p) - 1; s <- staff[w]
    sapply(0:max(0, length(p) - 1 - s), function(k) sum(p[pmax(0, n - s) == k]))
  })
  tot <- Reduce(function(a, b) convolve(a, rev(b), type = "open"), ex)
  short <- 1 - cumsum(tot)
  f <- which(short <= 1 - cover + 1e-12)[1] - 1
  buf <- sapply(seq_along(pmfs), function(w) {
    p <- pmfs[[w]]; n <- seq_along(p) - 1; above <- sapply(n, function(m) 1 - sum(p[n <= m]))
    min(n[n >= staff[w] & above <= 1 - cover + 1e-12]) - staff[w]
  })
  cat(sprintf("F=%d short=%.15g fewer=%.15g buffers=%s\n", f, short[f + 1],
              if (f > 0) short[f] else NaN, paste(buf, collapse = ",")))
}
top <- 40
lam <- c(5.2, 6.8, 4.1, 7.5, 5.9, 3.3)
pois <- lapply(lam, function(l) dpois(0:top, l))
pool(pois, staff = c(6, 7, 5, 8, 6, 4), cover = 0.9)
# shifted binomial: need = 3 + Binom(8, 0.35), 4 + Binom(10, 0.5), 2 + Binom(6, 0.2)
bin <- list(c(0, 0, 0, dbinom(0:8, 8, 0.35)), c(0, 0, 0, 0, dbinom(0:10, 10, 0.5)), c(0, 0, dbinom(0:6, 6, 0.2)))
pool(bin, staff = c(5, 8, 3), cover = 0.95)
