#!/usr/bin/env Rscript
# Veil reference fixtures for app/stats/icc.ts, made with R's psych::ICC.
#
# Run from the repository root:   Rscript test/reference/agreement/make-fixtures.R
# (after /usr/bin/python3 test/reference/agreement/make-fixtures.py, which writes the invented rating
# sets this script reads from agreement-sets.json).
# Writes test/reference/agreement/icc-*.json and agreement-sets-psych.json. The Vitest tests read
# those JSON files, so CI needs no R.
#
# agreement-sets-psych.json, per invented rating set:
# - psych::cohen.kappa(x, levels = 1:points): every reader pair on the cases both scored (psych drops
#   incomplete pairs with na.omit), unweighted kappa with var.kappa (Fleiss, Cohen & Everitt 1969)
#   and its confidence limits, and weighted kappa with psych's default weights 1 - (i - j)^2/(p - 1)^2
#   (quadratic); av.kappa and av.wt, the means over pairs (Light's kappa). psych 2.2.9's var.weighted
#   multiplies the row term by p_i. * sum_j w_ij instead of sum_i p_i. w_ij (see cohen.kappa1), so
#   its weighted-kappa limits differ from Fleiss, Cohen & Everitt's; the tests take the weighted
#   standard error from statsmodels (which matches SAS) and only the weighted value from psych.
# - psych::ICC(na.omit(x), lmer = FALSE): the six ICCs with F-based limits on the complete cases.
# - stats::friedman.test(t(na.omit(x))) with readers as blocks and cases as treatments, its tie
#   correction included; Kendall's W = statistic / (m (n - 1)).
#
# psych::ICC is called with lmer = FALSE so that the mean squares come from the classical two-way
# ANOVA (aov), the one Shrout & Fleiss (1979) use. With lmer = TRUE psych takes variance components
# from lme4, which are truncated at zero and then differ from the ANOVA mean squares.
# Rows with a missing value are removed with na.omit() before the call (complete cases), as Veil does.

suppressPackageStartupMessages({
  library(psych)
  library(jsonlite)
})

out_dir <- file.path("test", "reference", "agreement")
generator <- sprintf("%s, psych %s, jsonlite %s", R.version.string,
                     as.character(packageVersion("psych")), as.character(packageVersion("jsonlite")))

icc_fixture <- function(name, source, x) {
  complete <- na.omit(x)
  r <- psych::ICC(complete, lmer = FALSE, alpha = 0.05)
  res <- r$results
  forms <- list()
  # psych's row order: ICC1, ICC2, ICC3, ICC1k, ICC2k, ICC3k
  veil_names <- c("ICC(1,1)", "ICC(2,1)", "ICC(3,1)", "ICC(1,k)", "ICC(2,k)", "ICC(3,k)")
  for (i in seq_len(6)) {
    forms[[veil_names[i]]] <- list(
      psych_type = res$type[i],
      value = res$ICC[i],
      F = res$F[i],
      df1 = res$df1[i],
      df2 = res$df2[i],
      p = res$p[i],
      ci95 = c(res[["lower bound"]][i], res[["upper bound"]][i])
    )
  }
  st <- r$stats  # rows df, SumSq, MS, F, p; columns subjects, Judges, Residual
  fixture <- list(
    generator = generator,
    call = "psych::ICC(na.omit(x), lmer = FALSE, alpha = 0.05)",
    source = source,
    matrix = unname(x),
    cases = r$n.obs,
    readers = r$n.judge,
    anova = list(
      BMS = st["MS", "subjects"], JMS = st["MS", "Judges"], EMS = st["MS", "Residual"], WMS = r$MSW,
      dfB = st["df", "subjects"], dfJ = st["df", "Judges"], dfE = st["df", "Residual"],
      SSB = st["SumSq", "subjects"], SSJ = st["SumSq", "Judges"], SSE = st["SumSq", "Residual"]
    ),
    forms = forms
  )
  path <- file.path(out_dir, paste0(name, ".json"))
  writeLines(toJSON(fixture, auto_unbox = TRUE, digits = NA, pretty = TRUE, na = "null"), path)
  cat("wrote", path, "\n")
}

# 1. Shrout & Fleiss (1979), Psychological Bulletin 86:420-428, Table 2: 6 targets x 4 judges.
sf <- matrix(c(9, 2, 5, 8,
               6, 1, 3, 2,
               8, 4, 6, 8,
               7, 1, 2, 6,
              10, 5, 6, 9,
               6, 2, 4, 7), ncol = 4, byrow = TRUE)
icc_fixture("icc-shrout-fleiss-1979", "Shrout & Fleiss (1979) Table 2, 6 targets x 4 judges", sf)

# 2. A larger random Likert table (1..5): 40 cases x 5 readers, case effect + reader bias + noise,
#    with 3 rows carrying a missing rating (dropped as incomplete cases).
set.seed(90210)
n <- 40; k <- 5
truth <- rnorm(n, mean = 3, sd = 1)
bias <- c(-0.4, 0, 0.3, 0.1, 0.6)
likert <- matrix(NA_real_, n, k)
for (j in seq_len(k)) likert[, j] <- pmin(5, pmax(1, round(truth + bias[j] + rnorm(n, sd = 0.7))))
likert[7, 2] <- NA; likert[19, 5] <- NA; likert[33, 1] <- NA
icc_fixture("icc-random-likert", "random: set.seed(90210), 40 cases x 5 readers, Likert 1..5, 3 incomplete rows", likert)

# 3. A random continuous table: 25 cases x 3 readers, weak agreement, rounded to 3 decimals.
set.seed(4181)
cont <- round(outer(rnorm(25, sd = 1), rep(1, 3)) + matrix(rnorm(75, sd = 1.5), 25, 3) +
              matrix(c(0, 0.5, -0.2), 25, 3, byrow = TRUE), 3)
icc_fixture("icc-random-continuous", "random: set.seed(4181), 25 cases x 3 readers, continuous", cont)

# 4. The invented rating sets of make-fixtures.py: Cohen pairs, Light's kappa, ICC, Friedman / Kendall's W.
sets_in <- fromJSON(file.path(out_dir, "agreement-sets.json"), simplifyVector = FALSE)$sets
as_matrix <- function(ratings) {
  do.call(rbind, lapply(ratings, function(row) sapply(row, function(v) if (is.null(v)) NA_real_ else v)))
}
sets_out <- lapply(sets_in, function(set) {
  x <- as_matrix(set$ratings)
  colnames(x) <- paste0("R", seq_len(ncol(x)))
  p <- set$points
  pairs <- list()
  if (ncol(x) == 2) {
    ck <- suppressWarnings(psych::cohen.kappa(na.omit(x), levels = 1:p))
    one <- list(ck)
    idx <- list(c(0, 1))
  } else {
    ck <- suppressWarnings(psych::cohen.kappa(x, levels = 1:p))
    one <- list(); idx <- list()
    for (a in 1:(ncol(x) - 1)) for (b in (a + 1):ncol(x)) {
      one[[length(one) + 1]] <- ck[[paste(colnames(x)[a], colnames(x)[b])]]
      idx[[length(idx) + 1]] <- c(a - 1, b - 1)
    }
  }
  for (i in seq_along(one)) {
    r <- one[[i]]
    pairs[[i]] <- list(
      readers = idx[[i]], n = r$n.obs,
      unweighted = list(value = r$kappa, se = sqrt(r$var.kappa),
                        ci95 = c(r$confid[1, "lower"], r$confid[1, "upper"])),
      quadratic = list(value = r$weighted.kappa, se_psych = sqrt(r$var.weighted))
    )
  }
  complete <- na.omit(x)
  icc <- psych::ICC(complete, lmer = FALSE, alpha = 0.05)$results
  veil_names <- c("ICC(1,1)", "ICC(2,1)", "ICC(3,1)", "ICC(1,k)", "ICC(2,k)", "ICC(3,k)")
  forms <- list()
  for (i in 1:6) forms[[veil_names[i]]] <- list(value = icc$ICC[i], ci95 = c(icc[["lower bound"]][i], icc[["upper bound"]][i]))
  # friedman.test(y): rows of y are blocks, columns treatments. Kendall's W ranks cases within each
  # reader, so readers are the blocks: y = t(complete), cases x readers transposed.
  fr <- friedman.test(t(complete))
  m <- ncol(complete); n <- nrow(complete)
  list(
    name = set$name,
    cohen_pairs = pairs,
    light_kappa = list(unweighted = if (ncol(x) == 2) ck$kappa else ck$av.kappa,
                       quadratic = if (ncol(x) == 2) ck$weighted.kappa else ck$av.wt),
    icc = list(cases = nrow(complete), forms = forms),
    kendall_w = list(chi2 = unname(fr$statistic), p = fr$p.value, df = unname(fr$parameter),
                     value = unname(fr$statistic) / (m * (n - 1)))
  )
})
path <- file.path(out_dir, "agreement-sets-psych.json")
writeLines(toJSON(list(
  generator = generator,
  calls = list(
    cohen = "psych::cohen.kappa(x, levels = 1:points) (two readers: cohen.kappa(na.omit(x), levels = 1:points))",
    icc = "psych::ICC(na.omit(x), lmer = FALSE, alpha = 0.05)",
    kendall_w = "stats::friedman.test(t(na.omit(x))); W = statistic / (m (n - 1))"
  ),
  sets = sets_out
), auto_unbox = TRUE, digits = NA, pretty = TRUE, na = "null"), path)
cat("wrote", path, "\n")
