#!/usr/bin/env Rscript
# Records reference values for `tabsight waves` with a survey design: each
# wave an independent sample with its own strata and PSUs (src/analysis/
# wavesDesign.ts, src/stats/waldAcrossSamples.ts).
#
# Reference library: the survey package for R (Lumley, T., "survey: analysis
# of complex survey samples"), Debian package r-cran-survey, on r-base-core
# (apt-get install -y r-cran-survey). Run:
#
#     Rscript scripts/record_survey_waves.R
#
# Data: fixtures/reference/survey-data/nhanes.csv (NHANES 2009-2010 extract
# shipped with the survey package; written by record_survey_reference.R).
# Three independent samples ("waves") are made from it by splitting its
# strata: SDMVSTRA <= 79 is wave w1, 80-84 w2, 85 and above w3 (the column
# `wave` that the tests add by the same rule). Each wave is then its own
# design: svydesign() on that wave's rows alone. HI_CHOL is missing for some
# rows, which stay in their wave's design as a domain (subset()).
#
# What is recorded, per table (HI_CHOL x RIAGENDR, 2 x 2; race x HI_CHOL,
# 4 x 2), and how:
#   * per wave: svychisq() on the wave's design restricted to the complete
#     rows (F, ndf, and the p-value with tabsight's design df, the wave's
#     PSUs minus strata, as record_survey_reference.R explains);
#   * per wave: the (r-1)(c-1) log odds ratios against the last row and
#     column and their covariance from svycontrast() on svymean() of the
#     cell indicators (the library's delta method), and the shares of the
#     first r-1 (c-1) levels of each margin with their covariance;
#   * across waves, written out below in their generalized-least-squares
#     form (the form tabsight's code does NOT use for the homogeneity tests,
#     which it computes from the differences against the first wave):
#       - equal log odds ratios in every wave: W = sum_k theta_k' A_k theta_k
#         - b' M^-1 b, A_k = Sigma_k^-1, M = sum A_k, b = sum A_k theta_k, on
#         (K-1)q df; F form (nu-d+1)/(nu d) W on d and nu-d+1 df, nu the
#         waves' design df together (Korn & Graubard 1990);
#       - 2 x 2: the GLS regression of the log odds ratio on the wave score
#         (0, 1, 2) with weights 1/var: slope, SE, W = (slope/SE)^2, F(1, nu);
#       - r x c: the layer-effect model theta_k = exp(beta (x_k - mean x)) psi
#         fitted by GLS: beta minimizing the profile Q(beta) by optimize(),
#         Q(0) - Q(beta) on F(1, nu), the interval {Q(beta) - Q(beta-hat) <=
#         qf(0.95, 1, nu)} by uniroot();
#       - each wave against the others' GLS common value (departures);
#       - margin drift: the same homogeneity W on the shares.
#   * a check by another route: for the 2 x 2 table, the Wald test of the
#     wave-by-RIAGENDR interaction in the saturated logistic model
#     svyglm(HI_CHOL ~ wave * RIAGENDR) on the three waves together
#     (regTermTest, method "Wald"), whose interaction coefficients are the
#     differences of the log odds ratios from wave w1: the same W.
suppressMessages(library(survey))
root <- normalizePath(file.path(dirname(sub("--file=", "", grep("--file=", commandArgs(FALSE), value = TRUE))), ".."))
source(file.path(root, "scripts", "survey_json.R"))
out_dir <- file.path(root, "fixtures", "reference")

nh <- read.csv(file.path(out_dir, "survey-data", "nhanes.csv"), colClasses = "character", na.strings = "")
nh$WTMEC2YR <- as.numeric(nh$WTMEC2YR)
stratum <- as.numeric(nh$SDMVSTRA)
nh$wave <- ifelse(stratum <= 79, "w1", ifelse(stratum <= 84, "w2", "w3"))
waves <- c("w1", "w2", "w3")
scores <- c(0, 1, 2)
K <- length(waves)
design_of <- function(rows) svydesign(id = ~SDMVPSU, strata = ~SDMVSTRA, weights = ~WTMEC2YR, nest = TRUE, data = rows)
dfs <- sapply(waves, function(w) {
  rows <- nh[nh$wave == w, ]
  length(unique(paste(rows$SDMVSTRA, rows$SDMVPSU))) - length(unique(rows$SDMVSTRA))
})
nu <- sum(dfs)
adjusted <- function(W, d) {
  den <- nu - d + 1
  Fs <- (nu - d + 1) / (nu * d) * W
  list(wald = W, waldPValue = pchisq(W, d, lower.tail = FALSE), statistic = Fs, numDf = d, denDf = den, pValue = pf(Fs, d, den, lower.tail = FALSE))
}
gls_homogeneity <- function(thetas, sigmas) {
  A <- lapply(sigmas, solve)
  M <- Reduce(`+`, A)
  b <- Reduce(`+`, Map(function(a, t) a %*% t, A, thetas))
  W <- sum(mapply(function(a, t) as.numeric(t(t) %*% a %*% t), A, thetas)) - as.numeric(t(b) %*% solve(M, b))
  list(W = W, common = as.vector(solve(M, b)), covariance = solve(M))
}

wave_table <- function(rowvar, colvar) {
  per_wave <- list(); thetas <- list(); sigmas <- list(); rowShares <- list(); rowSigmas <- list(); colShares <- list(); colSigmas <- list()
  rl <- sort(unique(na.omit(nh[[rowvar]]))); cl <- sort(unique(na.omit(nh[[colvar]])))
  r <- length(rl); c <- length(cl); q <- (r - 1) * (c - 1)
  cell_names <- as.vector(t(outer(rl, cl, paste, sep = "|")))  # row-major
  for (w in waves) {
    rows <- nh[nh$wave == w, ]
    d <- design_of(rows)
    complete <- !is.na(rows[[rowvar]]) & !is.na(rows[[colvar]])
    dc <- if (all(complete)) d else subset(d, complete)
    dc$variables$.row <- factor(dc$variables[[rowvar]], levels = rl)
    dc$variables$.col <- factor(dc$variables[[colvar]], levels = cl)
    dc$variables$.cell <- factor(paste(dc$variables$.row, dc$variables$.col, sep = "|"), levels = cell_names)
    Fs <- svychisq(~ .row + .col, dc, statistic = "F")
    ndf <- Fs$parameter[["ndf"]]
    m <- svymean(~.cell, dc)
    p <- as.vector(coef(m)); names(p) <- cell_names
    V <- vcov(m)
    at <- function(i, j) (i - 1) * c + j
    G <- matrix(0, 0, r * c); th <- c()
    for (i in 1:(r - 1)) for (j in 1:(c - 1)) {
      cells <- c(at(i, j), at(i, c), at(r, j), at(r, c)); signs <- c(1, -1, -1, 1)
      g <- rep(0, r * c); g[cells] <- signs
      th <- c(th, sum(signs * log(p[cells]))); G <- rbind(G, g / ifelse(p > 0, p, 1))
    }
    # the library's own delta method for the same log odds ratios
    contrasts <- list()
    nm <- names(coef(m))
    for (i in 1:(r - 1)) for (j in 1:(c - 1)) {
      contrasts[[paste0("lor", i, j)]] <- substitute(log(A) - log(B) - log(C) + log(D), list(
        A = as.name(nm[at(i, j)]), B = as.name(nm[at(i, c)]), C = as.name(nm[at(r, j)]), D = as.name(nm[at(r, c)])))
    }
    lor <- svycontrast(m, contrasts)
    stopifnot(max(abs(as.vector(coef(lor)) - th)) < 1e-12)
    thetas[[w]] <- as.vector(coef(lor)); sigmas[[w]] <- unname(as.matrix(vcov(lor)))
    stopifnot(max(abs(sigmas[[w]] - G %*% V %*% t(G))) < 1e-10 * max(abs(sigmas[[w]])))
    share <- function(side) {
      count <- if (side == "row") r else c
      Gs <- t(sapply(1:(count - 1), function(t) { g <- rep(0, r * c); for (i in 1:r) for (j in 1:c) if ((if (side == "row") i else j) == t) g[at(i, j)] <- 1; g }))
      if (count == 2) Gs <- matrix(Gs, nrow = 1)
      list(values = as.vector(Gs %*% p), covariance = Gs %*% V %*% t(Gs))
    }
    rs <- share("row"); cs <- share("col")
    rowShares[[w]] <- rs$values; rowSigmas[[w]] <- rs$covariance; colShares[[w]] <- cs$values; colSigmas[[w]] <- cs$covariance
    per_wave[[w]] <- list(key = w, n = nrow(dc), designDf = unname(dfs[w]), F = unname(Fs$statistic), ndf = ndf,
                          pFWithOurDf = pf(unname(Fs$statistic), ndf, ndf * unname(dfs[w]), lower.tail = FALSE),
                          logOddsRatios = I(thetas[[w]]), covariance = I(as.vector(t(sigmas[[w]]))))
  }
  names(per_wave) <- NULL
  same <- gls_homogeneity(thetas, sigmas)
  out <- list(rowVariable = rowvar, colVariable = colvar, rowLevels = I(rl), colLevels = I(cl), degreesOfFreedom = I(unname(dfs)),
              waves = per_wave, sameAssociation = adjusted(same$W, (K - 1) * q))
  # departures: each wave against the GLS common value of the others
  out$departures <- lapply(seq_len(K), function(k) {
    others <- gls_homogeneity(thetas[-k], sigmas[-k])
    dlt <- thetas[[k]] - others$common
    S <- sigmas[[k]] + others$covariance
    W <- as.numeric(t(dlt) %*% solve(S, dlt))
    c(adjusted(W, q), list(z = if (q == 1) dlt / sqrt(S[1, 1]) else NULL))
  })
  if (q == 1) {
    y <- sapply(thetas, function(t) t[1]); wts <- 1 / sapply(sigmas, function(s) s[1, 1])
    X <- cbind(1, scores)
    XtWX <- t(X) %*% diag(wts) %*% X
    beta <- solve(XtWX, t(X) %*% diag(wts) %*% y)
    se <- sqrt(solve(XtWX)[2, 2])
    out$trend <- c(adjusted((beta[2] / se)^2, 1), list(slope = beta[2], standardError = se, intercept = beta[1],
      lower = beta[2] - qt(0.975, nu) * se, upper = beta[2] + qt(0.975, nu) * se,
      common = sum(wts * y) / sum(wts), scatter = sum(wts * (y - X %*% beta)^2)))
    # the same homogeneity W by another route: the saturated logistic model on the three waves together
    all <- design_of(nh)
    all$variables$.y <- as.numeric(all$variables[[rowvar]] == rl[1])
    all$variables$.x <- factor(all$variables[[colvar]], levels = cl)
    all$variables$.wave <- factor(all$variables$wave, levels = waves)
    keep <- !is.na(all$variables[[rowvar]]) & !is.na(all$variables[[colvar]])
    fit <- svyglm(.y ~ .wave * .x, subset(all, keep), family = quasibinomial())
    rt <- regTermTest(fit, ~ .wave:.x, method = "Wald", df = Inf)
    out$logisticInteractionWald <- unname(rt$chisq)
    stopifnot(abs(rt$chisq - same$W) < 1e-6 * same$W)
  } else {
    xc <- scores - mean(scores)
    A <- lapply(sigmas, solve)
    total <- sum(mapply(function(a, t) as.numeric(t(t) %*% a %*% t), A, thetas))
    profile <- function(b) {
      phi <- exp(b * xc)
      M <- Reduce(`+`, Map(function(a, f) f^2 * a, A, phi))
      v <- Reduce(`+`, Map(function(a, t, f) f * (a %*% t), A, thetas, phi))
      list(Q = total - as.numeric(t(v) %*% solve(M, v)), psi = as.vector(solve(M, v)))
    }
    bound <- 8 / diff(range(scores))
    opt <- optimize(function(b) profile(b)$Q, c(-bound, bound), tol = 1e-12)
    Q0 <- profile(0)$Q; Qb <- opt$objective
    crit <- qf(0.95, 1, nu)
    g <- function(b) profile(b)$Q - Qb - crit
    lower <- if (g(-bound) > 0) uniroot(g, c(-bound, opt$minimum), tol = 1e-13)$root else NA
    upper <- if (g(bound) > 0) uniroot(g, c(opt$minimum, bound), tol = 1e-13)$root else NA
    out$trend <- c(adjusted(Q0 - Qb, 1), list(slope = opt$minimum, lower = lower, upper = upper, homogeneousQ = Q0, trendQ = Qb,
                                             pattern = I(profile(opt$minimum)$psi)))
  }
  margin <- function(values, covs) adjusted(gls_homogeneity(values, covs)$W, (K - 1) * length(values[[1]]))
  out$rowDrift <- margin(rowShares, rowSigmas)
  out$colDrift <- margin(colShares, colSigmas)
  out
}

out <- list(
  recordedWith = list(library = "survey (R)", debianPackage = "r-cran-survey", version = as.character(packageVersion("survey")),
                      R = paste(R.version$major, R.version$minor, sep = ".")),
  data = "nhanes.csv",
  split = list(column = "SDMVSTRA", upTo = I(c(79, 84)), labels = I(waves)),
  design = list(strata = "SDMVSTRA", cluster = "SDMVPSU", weight = "WTMEC2YR"),
  scores = I(scores),
  tables = list(wave_table("HI_CHOL", "RIAGENDR"), wave_table("race", "HI_CHOL"))
)
writeLines(to_json(out), file.path(out_dir, "survey-waves.json"))
cat("wrote", file.path(out_dir, "survey-waves.json"), "\n")
