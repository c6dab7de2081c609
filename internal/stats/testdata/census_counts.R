# Reference fits for internal/stats/census_model_test.go.
# Run from internal/stats/testdata:  Rscript census_counts.R > census_counts.txt
# Writes census_counts.csv (an invented census series: 6 weeks x 7 weekdays x
# 2 shifts of one tier) the first time, then fits it three ways.
if (!file.exists("census_counts.csv")) {
  set.seed(20261205)
  d <- expand.grid(shift = c("day", "night"), day = 0:41)
  d$weekday <- d$day %% 7
  d$t <- d$day / 7                       # trend in weeks
  wd <- c(0.25, 0.20, 0.15, 0.10, 0.0, -0.30, -0.35)
  mu <- exp(2.2 + wd[d$weekday + 1] + ifelse(d$shift == "night", -0.25, 0) + 0.03 * d$t)
  d$y <- rnbinom(nrow(d), mu = mu, size = 12)
  write.csv(d[, c("day", "weekday", "shift", "t", "y")], "census_counts.csv", row.names = FALSE, quote = FALSE)
}
d <- read.csv("census_counts.csv")
d$weekday <- factor(d$weekday, levels = 0:6)
d$shift <- factor(d$shift, levels = c("day", "night"))
library(MASS)
# Tight convergence, so that the reference is the maximum itself: with the
# default epsilon = 1e-8 the GLM SEs and dispersion R prints are computed from the
# weights of the last-but-one iterate and differ from these by about 1e-5.
# glm.nb keeps its default control: at 1e-14 its alternation with theta.ml
# (whose own tolerance is eps^0.25) reaches its limit without converging.
ctl <- glm.control(epsilon = 1e-14, maxit = 100)
cat(R.version.string, "; MASS", format(packageVersion("MASS")), "\n")
show <- function(name, fit) {
  s <- summary(fit)
  cat("##", name, "\n")
  cf <- coef(s)
  for (i in seq_len(nrow(cf))) cat(sprintf("%-20s %.12g %.12g\n", rownames(cf)[i], cf[i, 1], cf[i, 2]))
  cat(sprintf("dispersion %.12g\n", s$dispersion))
  cat(sprintf("deviance %.12g\n", deviance(fit)))
  if (!is.null(fit$theta)) cat(sprintf("theta %.12g SE %.12g twologlik %.12g\n", fit$theta, fit$SE.theta, fit$twologlik))
}
show("poisson: glm(y ~ weekday*shift + t, family = poisson, data = d, control = ctl)",
     glm(y ~ weekday * shift + t, family = poisson, data = d, control = ctl))
show("quasipoisson: glm(y ~ weekday*shift + t, family = quasipoisson, data = d, control = ctl)",
     glm(y ~ weekday * shift + t, family = quasipoisson, data = d, control = ctl))
show("negbin: MASS::glm.nb(y ~ weekday*shift + t, data = d)",
     glm.nb(y ~ weekday * shift + t, data = d))
show("quasipoisson main effects: glm(y ~ weekday + shift + t, family = quasipoisson, data = d, control = ctl)",
     glm(y ~ weekday + shift + t, family = quasipoisson, data = d, control = ctl))
