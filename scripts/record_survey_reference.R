#!/usr/bin/env Rscript
# Records reference values for tabsight's design-based statistics
# (src/stats/designCovariance.ts, designEffects.ts, raoScott.ts,
# designPercentages.ts, proportionIntervals.ts).
#
# Reference library: the survey package for R (Lumley, T., "survey: analysis
# of complex survey samples"), Debian package r-cran-survey 4.1-1-1, on
# r-base-core 4.2.2 (apt-get install -y r-cran-survey). Run:
#
#     Rscript scripts/record_survey_reference.R
#
# Data: public data sets that the survey package ships, with their published
# design variables:
#   apistrat  stratified sample of California schools (Academic Performance
#             Index, California Department of Education, 2000): strata stype,
#             weights pw, fpc = schools in the stratum;
#   apiclus1  one-stage cluster sample of 15 school districts (dnum), fpc;
#   apiclus2  two-stage cluster sample (districts dnum, then schools snum),
#             fpc1 at the first stage;
#   nhanes    NHANES 2009-2010 extract (National Center for Health Statistics):
#             strata SDMVSTRA, PSUs SDMVPSU (nested), weights WTMEC2YR; HI_CHOL
#             is missing for 745 people, who form the domain case.
# The columns used are written to fixtures/reference/survey-data/*.csv and the
# reference values to fixtures/reference/survey-reference.json.
#
# Where the library's conventions differ from tabsight's
# (design-based-tests.md), this script records what is needed to compare
# under tabsight's conventions, and says so beside the value:
#   * n in X2: svychisq rescales the table to nrow(design); every design here
#     is first restricted to the complete rows of the pair (subset(), which
#     keeps each stratum's PSU count from the whole file, as tabsight does),
#     so its n is tabsight's n.
#   * design df: svychisq uses the PSUs and strata that have complete rows
#     (of a subset) and, for replicate designs, the rank of the replicate
#     weights minus 1; tabsight uses the PSUs and strata of the whole file, and
#     R - 1. Both are recorded, and the F p-value is also computed with
#     tabsight's df (pf, R's F distribution).
#   * two-stage designs: tabsight's variance is the with-replacement
#     ultimate-cluster one with first-stage fpc; the library is run with
#     options(survey.ultimate.cluster = TRUE), under which only fpc1 enters.
#   * cell design effects: svymean(deff = "replace") divides by the variance
#     of a simple random sample as svyvar gives it, p(1-p) n/(n-1) / n;
#     tabsight uses Kish's p(1-p)/n. Recorded as the library gives them, with
#     n; tabsight's value is the library's times n/(n-1).
#   * first-order statistic on G2: the library has none; recorded as G2 (from
#     svytable) divided by the library's mean design effect, p from pchisq.
#   * Korn-Graubard intervals (svyciprop method "beta") use the library's
#     degf() of the (sub)design; where that differs from tabsight's df the
#     interval is also recorded from the same formula with tabsight's df
#     (library variance, R's qt and qbeta).
#   * replicate variance: centred at the mean of the replicates
#     (survey.replicates.mse = FALSE), tabsight's default; JK1 and bootstrap
#     designs are built without fpc because tabsight's jk1/bootstrap scales
#     carry none; JKn's per-replicate factors (rscales) are recorded and given
#     to tabsight as its jkn scale factors.
#   * BRR needs two PSUs per stratum: NHANES stratum 86 has three, and for the
#     BRR and Fay designs its PSU 3 is merged into PSU 2 (collapsing PSUs,
#     common practice); column psu_brr holds the merged PSU.
#   * lonely PSU: the rows of PSU 2 of NHANES stratum 89 are removed (file
#     nhanes-lonely.csv), leaving stratum 89 with one PSU; the library's
#     lonely.psu options certainty, adjust and average match tabsight's.
suppressMessages(library(survey))
options(survey.replicates.mse = FALSE, survey.adjust.domain.lonely = FALSE)

root <- normalizePath(file.path(dirname(sub("--file=", "", grep("--file=", commandArgs(FALSE), value = TRUE))), ".."))
out_dir <- file.path(root, "fixtures", "reference")
data_dir <- file.path(out_dir, "survey-data")
dir.create(data_dir, showWarnings = FALSE, recursive = TRUE)

source(file.path(root, "scripts", "survey_json.R"))  # num() and to_json()

data(api)
data(nhanes)

# ---- the data, as CSV ---------------------------------------------------------------------
apistrat$meals3 <- cut(apistrat$meals, c(-1, 33, 66, 100), labels = c("low", "mid", "high"))
apiclus1$meals3 <- cut(apiclus1$meals, c(-1, 33, 66, 100), labels = c("low", "mid", "high"))
write_data <- function(df, name) {
  for (col in names(df)) if (is.factor(df[[col]])) df[[col]] <- as.character(df[[col]])
  for (col in names(df)) if (any(grepl(",", df[[col]]))) stop("column ", col, " has a comma; the CSV is written without quotes")
  write.csv(df, file.path(data_dir, name), row.names = FALSE, quote = FALSE, na = "")
}
write_data(apistrat[, c("stype", "pw", "fpc", "sch.wide", "awards", "meals3", "yr.rnd")], "apistrat.csv")
write_data(apiclus1[, c("dnum", "pw", "fpc", "stype", "sch.wide", "awards", "meals3", "comp.imp")], "apiclus1.csv")
write_data(apiclus2[, c("dnum", "snum", "pw", "fpc1", "stype", "sch.wide", "awards")], "apiclus2.csv")
nh <- nhanes
nh$psu_brr <- ifelse(nh$SDMVSTRA == 86 & nh$SDMVPSU == 3, 2, nh$SDMVPSU)
nh$agecat <- gsub(",", "-", as.character(nh$agecat))  # "(19,39]" -> "(19-39]": the CSV is written without quotes
write_data(nh[, c("SDMVSTRA", "SDMVPSU", "psu_brr", "WTMEC2YR", "HI_CHOL", "race", "agecat", "RIAGENDR")], "nhanes.csv")
lonely <- nh[!(nh$SDMVSTRA == 89 & nh$SDMVPSU == 2), ]
write_data(lonely[, c("SDMVSTRA", "SDMVPSU", "WTMEC2YR", "race", "agecat")], "nhanes-lonely.csv")

# ---- one table ------------------------------------------------------------------------------
# Cells are recorded row-major (row level i, column level j -> i * c + j), tabsight's order;
# the library's interaction() columns run column-major.
table_reference <- function(design, rowvar, colvar, our_df) {
  complete <- !is.na(design$variables[[rowvar]]) & !is.na(design$variables[[colvar]])
  d <- if (all(complete)) design else design[complete, ]
  rl <- sort(unique(as.character(d$variables[[rowvar]])))
  cl <- sort(unique(as.character(d$variables[[colvar]])))
  d$variables$.row <- factor(as.character(d$variables[[rowvar]]), levels = rl)
  d$variables$.col <- factor(as.character(d$variables[[colvar]]), levels = cl)
  nr <- length(rl); nc <- length(cl)
  mm <- model.matrix(~ interaction(.row, .col) - 1, d$variables)
  m <- svymean(mm, d, deff = "replace")
  order <- as.vector(t(matrix(seq_len(nr * nc), nr, nc)))  # row-major positions in the column-major vector
  p <- as.vector(coef(m))[order]
  V <- vcov(m)[order, order]
  N <- nrow(mm)
  Fs <- svychisq(~ .row + .col, d, statistic = "F")
  Cs <- svychisq(~ .row + .col, d, statistic = "Chisq")
  # the library's Delta, as svychisq computes it, for its eigenvalues
  mf1 <- expand.grid(rows = 1:nr, cols = 1:nc)
  X1 <- model.matrix(~ factor(rows) + factor(cols), mf1)
  X12 <- model.matrix(~ factor(rows) * factor(cols), mf1)
  Cmat <- qr.resid(qr(X1), X12[, -(1:(nr + nc - 1)), drop = FALSE])
  mean2 <- coef(m)
  iD <- diag(ifelse(mean2 == 0, 0, 1 / mean2))
  Delta <- solve(t(Cmat) %*% (iD / N) %*% Cmat, t(Cmat) %*% iD %*% vcov(m) %*% iD %*% Cmat)
  eig <- sort(Re(eigen(Delta, only.values = TRUE)$values))
  tab <- svytable(~ .row + .col, d, Ntotal = N)
  X2 <- suppressWarnings(chisq.test(tab, correct = FALSE))$statistic
  E <- outer(rowSums(tab), colSums(tab)) / sum(tab)
  G2 <- 2 * sum(ifelse(tab > 0, tab * log(tab / E), 0))
  k <- (nr - 1) * (nc - 1)
  meanDeff <- sum(diag(Delta)) / k
  ndf <- Fs$parameter[["ndf"]]
  list(
    rowVariable = rowvar, colVariable = colvar, rowLevels = I(rl), colLevels = I(cl), n = N,
    proportions = I(p), covariance = I(as.vector(t(V))),
    cellDeffReplace = I(diag(attr(m, "deff"))[order]),
    X2 = unname(X2), G2 = G2,
    eigenvalues = I(eig), trace = sum(diag(Delta)), traceOfSquare = sum(diag(Delta %*% Delta)), meanDesignEffect = meanDeff,
    F = unname(Fs$statistic), ndf = ndf, ddf = Fs$parameter[["ddf"]], pF = Fs$p.value,
    libraryDesignDf = Fs$parameter[["ddf"]] / ndf,
    designDf = our_df, pFWithOurDf = pf(unname(Fs$statistic), ndf, ndf * our_df, lower.tail = FALSE),
    chisq = unname(X2) / meanDeff, pChisq = Cs$p.value,
    chisqG2 = G2 / meanDeff, pChisqG2 = pchisq(G2 / meanDeff, k, lower.tail = FALSE)
  )
}

# Percentages with intervals: cell proportions in the complete rows, row proportions (domain: the row
# level), column proportions (domain: the column level); library variance, svyciprop intervals.
kg_formula <- function(p, v, n, df, level = 0.95) {
  alpha <- 1 - level
  neff <- if (v > 0 && p > 0 && p < 1) p * (1 - p) / v else n
  neff <- neff * (qt(alpha / 2, n - 1) / qt(alpha / 2, df))^2
  c(if (p > 0) qbeta(alpha / 2, neff * p, neff * (1 - p) + 1) else 0,
    if (p < 1) qbeta(1 - alpha / 2, neff * p + 1, neff * (1 - p)) else 1)
}
one_proportion <- function(d, indicator, our_df) {
  d$variables$.ind <- indicator
  # the estimate and its variance from svymean (svyciprop's logit route reports expit of an iterated
  # glm fit, exact only to the fit's convergence, ~1e-9: its interval ends are compared to that tolerance)
  m <- svymean(~ .ind, d)
  logit <- svyciprop(~ .ind, d, method = "logit", df = our_df)
  beta <- svyciprop(~ .ind, d, method = "beta")
  p <- as.vector(coef(m)); v <- as.vector(vcov(m))
  list(proportion = p, standardError = sqrt(v), domainSize = nrow(d),
       logit = I(as.vector(attr(logit, "ci"))),
       kornGraubardLibrary = I(as.vector(attr(beta, "ci"))), kornGraubardLibraryDf = degf(d),
       kornGraubardOurDf = I(kg_formula(p, v, nrow(d), our_df)))
}
percent_reference <- function(design, rowvar, colvar, our_df) {
  complete <- !is.na(design$variables[[rowvar]]) & !is.na(design$variables[[colvar]])
  d <- if (all(complete)) design else design[complete, ]
  rv <- as.character(d$variables[[rowvar]]); cv <- as.character(d$variables[[colvar]])
  rl <- sort(unique(rv)); cl <- sort(unique(cv))
  cells <- list(); rows <- list(); cols <- list()
  for (i in seq_along(rl)) for (j in seq_along(cl)) {
    cells[[length(cells) + 1]] <- one_proportion(d, as.numeric(rv == rl[i] & cv == cl[j]), our_df)
    di <- d[rv == rl[i], ]
    rows[[length(rows) + 1]] <- one_proportion(di, as.numeric(as.character(di$variables[[colvar]]) == cl[j]), our_df)
    dj <- d[cv == cl[j], ]
    cols[[length(cols) + 1]] <- one_proportion(dj, as.numeric(as.character(dj$variables[[rowvar]]) == rl[i]), our_df)
  }
  rowMargins <- lapply(rl, function(level) one_proportion(d, as.numeric(rv == level), our_df))
  colMargins <- lapply(cl, function(level) one_proportion(d, as.numeric(cv == level), our_df))
  list(rowVariable = rowvar, colVariable = colvar, rowLevels = I(rl), colLevels = I(cl), designDf = our_df, level = 0.95,
       cell = cells, row = rows, column = cols, rowMargins = rowMargins, columnMargins = colMargins)
}

psus_minus_strata <- function(strata, psu) length(unique(paste(strata, psu))) - length(unique(strata))

# ---- Taylor designs ------------------------------------------------------------------------
dstrat <- svydesign(id = ~1, strata = ~stype, weights = ~pw, fpc = ~fpc, data = apistrat)
dclus1 <- svydesign(id = ~dnum, weights = ~pw, fpc = ~fpc, data = apiclus1)
dclus1nofpc <- svydesign(id = ~dnum, weights = ~pw, data = apiclus1)
options(survey.ultimate.cluster = TRUE)
dclus2 <- svydesign(id = ~dnum + snum, weights = ~pw, fpc = ~fpc1 + fpc2, data = apiclus2)  # ultimate cluster: only fpc1 is used
dnh <- svydesign(id = ~SDMVPSU, strata = ~SDMVSTRA, weights = ~WTMEC2YR, nest = TRUE, data = nh)

df_strat <- psus_minus_strata(apistrat$stype, seq_len(nrow(apistrat)))
df_clus1 <- psus_minus_strata(rep(1, nrow(apiclus1)), apiclus1$dnum)
df_clus2 <- psus_minus_strata(rep(1, nrow(apiclus2)), apiclus2$dnum)
df_nh <- psus_minus_strata(nh$SDMVSTRA, nh$SDMVPSU)

taylor <- list(
  list(name = "apistrat: stratified, fpc, every school its own PSU", data = "apistrat.csv",
       design = list(strata = "stype", cluster = NULL, weight = "pw", fpc = "fpc"),
       tables = list(table_reference(dstrat, "sch.wide", "awards", df_strat),
                     table_reference(dstrat, "meals3", "stype", df_strat),
                     table_reference(dstrat, "yr.rnd", "meals3", df_strat))),
  list(name = "apiclus1: one-stage cluster sample of 15 districts, fpc", data = "apiclus1.csv",
       design = list(strata = NULL, cluster = "dnum", weight = "pw", fpc = "fpc"),
       tables = list(table_reference(dclus1, "sch.wide", "stype", df_clus1),
                     table_reference(dclus1, "meals3", "stype", df_clus1))),
  list(name = "apiclus1 without fpc (the design the jackknife replicates are made from)", data = "apiclus1.csv",
       design = list(strata = NULL, cluster = "dnum", weight = "pw", fpc = NULL),
       tables = list(table_reference(dclus1nofpc, "sch.wide", "stype", df_clus1))),
  list(name = "apiclus2: two-stage cluster sample, ultimate clusters with first-stage fpc", data = "apiclus2.csv",
       design = list(strata = NULL, cluster = "dnum", weight = "pw", fpc = "fpc1"),
       tables = list(table_reference(dclus2, "sch.wide", "stype", df_clus2))),
  list(name = "nhanes: 15 strata, 31 PSUs; HI_CHOL missing for 745 people (domain)", data = "nhanes.csv",
       design = list(strata = "SDMVSTRA", cluster = "SDMVPSU", weight = "WTMEC2YR", fpc = NULL),
       tables = list(table_reference(dnh, "HI_CHOL", "race", df_nh),
                     table_reference(dnh, "agecat", "race", df_nh)))
)

# Domain by a filter: elementary schools of apiclus1 (the other rows stay in the design with z = 0).
dE <- subset(dclus1, stype == "E")
domain <- list(name = "apiclus1, domain stype == E", data = "apiclus1.csv", filter = list(column = "stype", value = "E"),
               design = list(strata = NULL, cluster = "dnum", weight = "pw", fpc = "fpc"),
               table = table_reference(dE, "sch.wide", "comp.imp", df_clus1))

# Lonely PSU: stratum 89 left with one PSU.
dlonely <- svydesign(id = ~SDMVPSU, strata = ~SDMVSTRA, weights = ~WTMEC2YR, nest = TRUE, data = lonely)
df_lonely <- psus_minus_strata(lonely$SDMVSTRA, lonely$SDMVPSU)
lonely_ref <- list()
for (treatment in c("certainty", "adjust", "average")) {
  options(survey.lonely.psu = treatment)
  lonely_ref[[treatment]] <- table_reference(dlonely, "agecat", "race", df_lonely)
}
options(survey.lonely.psu = "fail")
failMessage <- tryCatch({ svymean(~race, dlonely); "no error" }, error = function(e) conditionMessage(e))

# ---- percentages ---------------------------------------------------------------------------
percentages <- list(
  list(name = "apistrat", data = "apistrat.csv", design = taylor[[1]]$design, ref = percent_reference(dstrat, "sch.wide", "awards", df_strat)),
  list(name = "apiclus1", data = "apiclus1.csv", design = taylor[[2]]$design, ref = percent_reference(dclus1, "sch.wide", "stype", df_clus1)),
  list(name = "nhanes (domain: HI_CHOL missing)", data = "nhanes.csv", design = taylor[[5]]$design, ref = percent_reference(dnh, "HI_CHOL", "race", df_nh))
)

# ---- replicate designs ---------------------------------------------------------------------
dnh_brr <- svydesign(id = ~psu_brr, strata = ~SDMVSTRA, weights = ~WTMEC2YR, nest = TRUE, data = nh)
set.seed(20240611)
replicate_designs <- list(
  list(method = "jk1", data = "apiclus1.csv", weight = "pw", source = "as.svrepdesign(apiclus1 without fpc, type = 'JK1')",
       rep = as.svrepdesign(dclus1nofpc, type = "JK1"), pairs = list(c("sch.wide", "stype"), c("meals3", "stype"))),
  list(method = "jkn", data = "apistrat.csv", weight = "pw", source = "as.svrepdesign(apistrat with fpc, type = 'JKn')",
       rep = as.svrepdesign(dstrat, type = "JKn"), pairs = list(c("sch.wide", "awards"))),
  list(method = "brr", data = "nhanes.csv", weight = "WTMEC2YR", source = "as.svrepdesign(nhanes with psu_brr, type = 'BRR')",
       rep = as.svrepdesign(dnh_brr, type = "BRR"), pairs = list(c("agecat", "race"), c("HI_CHOL", "race"))),
  list(method = "fay", rho = 0.3, data = "nhanes.csv", weight = "WTMEC2YR", source = "as.svrepdesign(nhanes with psu_brr, type = 'Fay', fay.rho = 0.3)",
       rep = as.svrepdesign(dnh_brr, type = "Fay", fay.rho = 0.3), pairs = list(c("agecat", "race"))),
  list(method = "bootstrap", data = "apiclus1.csv", weight = "pw", source = "as.svrepdesign(apiclus1 without fpc, type = 'subbootstrap', replicates = 50), set.seed(20240611)",
       rep = as.svrepdesign(dclus1nofpc, type = "subbootstrap", replicates = 50), pairs = list(c("sch.wide", "stype")))
)
replicates <- lapply(replicate_designs, function(r) {
  rw <- r$rep$repweights  # compressed: multipliers by PSU and the PSU of every row
  R <- ncol(rw$weights)
  list(method = r$method, rho = if (is.null(r$rho)) NULL else r$rho, data = r$data, weight = r$weight, source = r$source,
       replicates = R, scale = r$rep$scale, rscales = I(as.vector(r$rep$rscales)),
       libraryDegf = degf(r$rep),
       # full replicate weight of row i, replicate r = weight_i * multipliers[psuOfRow[i] - 1][r]
       psuOfRow = I(as.vector(rw$index)), multipliers = lapply(seq_len(nrow(rw$weights)), function(i) I(as.vector(rw$weights[i, ]))),
       tables = lapply(r$pairs, function(pr) table_reference(r$rep, pr[1], pr[2], R - 1)))
})

out <- list(
  recordedWith = list(library = "survey (R)", debianPackage = "r-cran-survey", version = as.character(packageVersion("survey")),
                      R = paste(R.version$major, R.version$minor, sep = ".")),
  taylor = taylor, domain = domain,
  lonely = list(data = "nhanes-lonely.csv", design = taylor[[5]]$design, failMessage = failMessage,
                certainty = lonely_ref$certainty, adjust = lonely_ref$adjust, average = lonely_ref$average),
  percentages = percentages, replicates = replicates
)
writeLines(to_json(out), file.path(out_dir, "survey-reference.json"))
cat("wrote", file.path(out_dir, "survey-reference.json"), "\n")
