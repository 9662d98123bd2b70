# Obuchowski-Rockette analysis with Hillis's denominator degrees of freedom, computed in base R
# straight from the published formulas, on a small invented data set, as an independent check of
# app/stats/comparison/or-mrmc.ts.
#   Obuchowski & Rockette (1995), Commun Stat Simul Comput 24:285-308 (model, MS(T), MS(TxR), Cov1-3).
#   Hillis, Obuchowski, Schartz & Berbaum (2005), Stat Med 24:1579-1607 (jackknife covariances).
#   Hillis (2007), Stat Med 26:596-619 (denominator MS(TxR) + J max(Cov2 - Cov3, 0) and ddf_H).
# Figure of merit: a reader's mean score over the cases.
# Run: Rscript make-or-hillis.R > or-hillis-r.json
set.seed(2718)
t <- 2; J <- 4; c <- 12
case_effect <- rnorm(c, 0, 0.8)
method_case <- matrix(rnorm(t * c, 0, 0.7), t, c)  # method x case interaction, so Cov2 > Cov3
scores <- array(0, dim = c(t, J, c))
for (i in 1:t) for (j in 1:J) scores[i, j, ] <- round(pmin(5, pmax(1, 3 + 0.4 * (i == 2) + 0.2 * j / J + case_effect + method_case[i, ] + rnorm(c, 0, 0.6))))

theta <- apply(scores, c(1, 2), mean)
jack <- array(0, dim = c(t, J, c))
for (k in 1:c) jack[, , k] <- apply(scores[, , -k, drop = FALSE], c(1, 2), mean)
jmean <- apply(jack, c(1, 2), mean)
covjk <- function(i, j, i2, j2) (c - 1) / c * sum((jack[i, j, ] - jmean[i, j]) * (jack[i2, j2, ] - jmean[i2, j2]))
v <- c(); c1 <- c(); c2 <- c(); c3 <- c()
for (i in 1:t) for (j in 1:J) for (i2 in 1:t) for (j2 in 1:J) {
  x <- covjk(i, j, i2, j2)
  if (i == i2 && j == j2) v <- c(v, x) else if (i != i2 && j == j2) c1 <- c(c1, x) else if (i == i2 && j != j2) c2 <- c(c2, x) else c3 <- c(c3, x)
}
Var <- mean(v); Cov1 <- mean(c1); Cov2 <- mean(c2); Cov3 <- mean(c3)
ti <- rowMeans(theta); tj <- colMeans(theta); tg <- mean(theta)
msT <- J * sum((ti - tg)^2) / (t - 1)
msTR <- sum((theta - outer(ti, rep(1, J)) - outer(rep(1, t), tj) + tg)^2) / ((t - 1) * (J - 1))
D <- msTR + J * max(Cov2 - Cov3, 0)
F <- msT / D
ddf <- D^2 / (msTR^2 / ((t - 1) * (J - 1)))
p <- 1 - pf(F, t - 1, ddf)
est <- ti[1] - ti[2]
se <- sqrt(2 * D / J)
ci <- est + c(-1, 1) * qt(0.975, ddf) * se
cat(jsonlite::toJSON(list(
  generator = paste0(R.version.string, ", jsonlite ", packageVersion("jsonlite")),
  scores = lapply(1:t, function(i) lapply(1:J, function(j) scores[i, j, ])),
  expected = list(msT = msT, msTR = msTR, variance = Var, cov1 = Cov1, cov2 = Cov2, cov3 = Cov3,
                  F = F, ddf = ddf, p = p, estimate = est, se = se, ci95 = ci)
), auto_unbox = TRUE, digits = 15))
