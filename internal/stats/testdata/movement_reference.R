# Reference values of movement_test.go (EstimateMovementRate, MovementRate.draw).
# Run: Rscript movement_reference.R > movement_reference.txt  (R 4.2.2)
cat(R.version.string, "\n")
# Poisson-looking admissions (underdispersed): 10 records
a <- c(2,1,3,2,2,1,2,3,2,2)
f <- glm(a ~ 1, family=quasipoisson); cat("disp a", summary(f)$dispersion, "\n")
S <- sum(a); m <- length(a)
print(qgamma(c(0.05,0.95), shape=S+0.5, rate=m), digits=17); print((S+0.5)/m, digits=17)
# overdispersed discharges
d <- c(0,4,1,0,6,2,0,3,0,5,1,0)
f <- glm(d ~ 1, family=quasipoisson, control=glm.control(epsilon=1e-14, maxit=100)); phi <- summary(f)$dispersion; print(phi, digits=17)
S <- sum(d); m <- length(d)
print(qgamma(c(0.05,0.95), shape=S/phi+0.5, rate=m/phi), digits=17); print((S/phi+0.5)/(m/phi), digits=17)
# weekday: target weekday = 1 (Monday)
y <- c(5,6,4,7,5,6, 1,0,2,1,1,0,2,1,1,0)
wd <- c(rep(1,6), rep(3,10))
x <- as.numeric(wd==1)
f <- glm(y ~ x, family=quasipoisson); s <- summary(f); print(s$coefficients, digits=17); phi <- s$dispersion; print(phi, digits=17)
S <- sum(y[x==1]); m <- sum(x)
print(qgamma(c(0.05,0.95), shape=S/phi+0.5, rate=m/phi), digits=17); print((S/phi+0.5)/(m/phi), digits=17)
# predictive NB for Poisson case a
S <- 20; m <- 10
print(qnbinom(c(0.5,0.9,0.99), size=S+0.5, prob=m/(m+1)))
print(c((S+0.5)*(1/(m+1))/(m/(m+1)), (S+0.5)*(1/(m+1))/(m/(m+1))^2), digits=17)
# weekday case: φ̂ = 0.46 < 1 is taken as Poisson, so shape S + 1/2, rate m
print(qgamma(c(0.05,0.95), shape=33.5, rate=6), digits=17); print(33.5/6, digits=17)
# the same records for a Wednesday shift: its own 10 records, total 9, Poisson
print(qgamma(c(0.05,0.95), shape=9.5, rate=10), digits=17); print(9.5/10, digits=17)
