#!/usr/bin/env Rscript
# Records reference values for tabsight's commands with a survey design that
# the single-table fixtures (record_survey_reference.R) do not cover:
# `compare` with a design, whose two periods are independent samples.
#
# Reference library: the survey package for R (Lumley, T., "survey: analysis
# of complex survey samples"), Debian package r-cran-survey 4.1-1-1, on
# r-base-core 4.2.2 (apt-get install -y r-cran-survey). Run:
#
#     Rscript scripts/record_survey_commands.R
#
# Data: fixtures/reference/survey-data/nhanes.csv (NHANES 2009-2010 extract
# shipped with the survey package; written by record_survey_reference.R).
# Two independent samples are made from it by splitting its strata: rows of
# strata SDMVSTRA <= 82 form period "a", the others period "b" (the column
# `half` that the tests add by the same rule). Each period then has its own
# strata and PSUs, as two survey waves do.
#
# What is recorded, and how:
#   * each period's cell proportions of agecat x race and their covariance,
#     from svyby(~cell, ~half, design, svymean, covmat = TRUE) on the whole
#     design (domain estimation: a period's rows are a domain whose strata
#     hold no row of the other period, so its variance is that of its own
#     design; the script checks that the covariance between the periods is 0);
#   * the design degrees of freedom of each period: its PSUs minus its strata;
#   * from these, written out below (the formula tabsight's
#     src/stats/designWald.ts states): the Wald statistic of equal log odds
#     ratios (against the last row and column) W = d'(G_a V_a G_a' +
#     G_b V_b G_b')^-1 d by the delta method, its F form
#     (nu - k + 1)/(nu k) W on k and nu - k + 1 df (Fellegi 1980; Korn &
#     Graubard 1990), nu = nu_a + nu_b, with pf() and pchisq(); the same for
#     the row and the column margins (the first r - 1, c - 1 shares).
#   * the log odds ratios and their covariance are also taken from
#     svycontrast() (the library's own delta method) as a check of the
#     gradient written out here.
suppressMessages(library(survey))
root <- normalizePath(file.path(dirname(sub("--file=", "", grep("--file=", commandArgs(FALSE), value = TRUE))), ".."))
source(file.path(root, "scripts", "survey_json.R"))
out_dir <- file.path(root, "fixtures", "reference")

nh <- read.csv(file.path(out_dir, "survey-data", "nhanes.csv"), colClasses = "character")
nh$WTMEC2YR <- as.numeric(nh$WTMEC2YR)
nh$half <- ifelse(as.numeric(nh$SDMVSTRA) <= 82, "a", "b")
rowvar <- "agecat"; colvar <- "race"
rl <- sort(unique(nh[[rowvar]])); cl <- sort(unique(nh[[colvar]]))
r <- length(rl); c <- length(cl); K <- r * c
# cells row-major (tabsight's order): level i of the row variable, level j of the column variable -> i * c + j
cell_names <- as.vector(t(outer(rl, cl, paste, sep = "|")))
nh$cell <- factor(paste(nh[[rowvar]], nh[[colvar]], sep = "|"), levels = cell_names)
design <- svydesign(id = ~SDMVPSU, strata = ~SDMVSTRA, weights = ~WTMEC2YR, nest = TRUE, data = nh)

by <- svyby(~cell, ~half, design, svymean, covmat = TRUE)
p_all <- coef(by); V_all <- vcov(by)
periods <- c("a", "b")
index_of <- function(h) which(startsWith(names(p_all), paste0(h, ":")))
ia <- index_of("a"); ib <- index_of("b")
stopifnot(length(ia) == K, length(ib) == K)
cross <- max(abs(V_all[ia, ib]))
stopifnot(cross < 1e-12 * max(abs(V_all)))

log_odds <- function(p) {
  at <- function(i, j) (i - 1) * c + j
  values <- c(); G <- matrix(0, 0, K)
  for (i in 1:(r - 1)) for (j in 1:(c - 1)) {
    cells <- c(at(i, j), at(i, c), at(r, j), at(r, c)); signs <- c(1, -1, -1, 1)
    g <- rep(0, K); g[cells] <- signs / p[cells]
    values <- c(values, sum(signs * log(p[cells]))); G <- rbind(G, g)
  }
  list(values = values, G = G)
}
margin_shares <- function(p, side) {
  count <- if (side == "row") r else c
  values <- c(); G <- matrix(0, 0, K)
  for (t in 1:(count - 1)) {
    g <- rep(0, K)
    for (i in 1:r) for (j in 1:c) if ((if (side == "row") i else j) == t) g[(i - 1) * c + j] <- 1
    values <- c(values, sum(g * p)); G <- rbind(G, g)
  }
  list(values = values, G = G)
}
dfs <- sapply(periods, function(h) {
  rows <- nh$half == h
  length(unique(paste(nh$SDMVSTRA[rows], nh$SDMVPSU[rows]))) - length(unique(nh$SDMVSTRA[rows]))
})
wald <- function(qa, qb, Va, Vb) {
  k <- length(qa$values)
  S <- qa$G %*% Va %*% t(qa$G) + qb$G %*% Vb %*% t(qb$G)
  d <- qb$values - qa$values
  W <- as.numeric(t(d) %*% solve(S, d))
  nu <- sum(dfs)
  Fs <- (nu - k + 1) / (nu * k) * W
  list(wald = W, waldPValue = pchisq(W, k, lower.tail = FALSE), statistic = Fs, numDf = k, denDf = nu - k + 1,
       pValue = pf(Fs, k, nu - k + 1, lower.tail = FALSE), values = I(d))
}
pa <- as.vector(p_all[ia]); pb <- as.vector(p_all[ib])
Va <- V_all[ia, ia]; Vb <- V_all[ib, ib]

# the library's own delta method for the log odds ratios of period a, as a check of the gradient above
qa <- log_odds(pa)
contrasts <- list()
for (i in 1:(r - 1)) for (j in 1:(c - 1)) {
  name <- function(ii, jj) paste0("a:cell", cell_names[(ii - 1) * c + jj])
  contrasts[[paste0("lor", i, j)]] <- substitute(log(A) - log(B) - log(C) + log(D), list(
    A = as.name(name(i, j)), B = as.name(name(i, c)), C = as.name(name(r, j)), D = as.name(name(r, c))))
}
library_lor <- svycontrast(by, contrasts)
stopifnot(max(abs(as.vector(coef(library_lor)) - qa$values)) < 1e-12)
stopifnot(max(abs(vcov(library_lor) - qa$G %*% Va %*% t(qa$G))) < 1e-12 * max(abs(vcov(library_lor))))

out <- list(
  recordedWith = list(library = "survey (R)", debianPackage = "r-cran-survey", version = as.character(packageVersion("survey")),
                      R = paste(R.version$major, R.version$minor, sep = ".")),
  compare = list(
    data = "nhanes.csv", split = list(column = "SDMVSTRA", atMost = 82, labels = I(c("a", "b"))),
    design = list(strata = "SDMVSTRA", cluster = "SDMVPSU", weight = "WTMEC2YR"),
    rowVariable = rowvar, colVariable = colvar, rowLevels = I(rl), colLevels = I(cl),
    degreesOfFreedom = I(as.vector(dfs)),
    proportions = list(a = I(pa), b = I(pb)),
    change = wald(qa, log_odds(pb), Va, Vb),
    rowShift = wald(margin_shares(pa, "row"), margin_shares(pb, "row"), Va, Vb),
    colShift = wald(margin_shares(pa, "col"), margin_shares(pb, "col"), Va, Vb)
  )
)
writeLines(to_json(out), file.path(out_dir, "survey-commands.json"))
cat("wrote", file.path(out_dir, "survey-commands.json"), "\n")
