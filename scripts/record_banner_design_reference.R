#!/usr/bin/env Rscript
# Records reference values for tabsight banner with a survey design
# (src/analysis/banner.ts, src/stats/designDomainRatios.ts): the column
# shares and means of each break variable with their design-based standard
# errors, the design-based t of the difference between two columns (with
# the covariance of the two domain estimates), and the overall design-based
# F (Rao-Scott, second order) of each question x break.
#
# Reference library: the survey package for R (Lumley, T., "survey: analysis
# of complex survey samples"), Debian package r-cran-survey, on r-base-core
# (apt-get install -y r-cran-survey). Run:
#
#     Rscript scripts/record_banner_design_reference.R
#
# Routes of the library used for each value:
#   column share   svyby(~I(q == level), ~break, design[complete, ], svymean, covmat = TRUE)
#                  (complete = q and break present; `[` keeps the PSUs and
#                  strata of the whole file: domain estimation)
#   Total share    svymean(~I(q == level), design[q present, ])
#   difference     svycontrast(that svyby, e_a - e_b): estimate and SE;
#                  t = estimate / SE, two-sided p from Student's t on
#                  tabsight's design df (PSUs - strata of the whole file, or
#                  replicates - 1) with R's pt
#   means          svyby(~x, ~break, ..., svymean, covmat = TRUE) and svycontrast, the same way
#   overall        svychisq(~q + break, design[complete, ], statistic = "F"):
#                  F and its numerator df; p recomputed with pf on
#                  numerator df x tabsight's design df (the library's own
#                  denominator df is recorded beside it)
#
# Data (public, with published design variables; fixtures/reference/survey-data/):
#   nhanes.csv            NHANES 2009-2010 extract (National Center for Health
#                         Statistics): strata SDMVSTRA, PSUs SDMVPSU (nested),
#                         weights WTMEC2YR; HI_CHOL missing for 745 people (a domain)
#   apistrat-banner.csv   California Academic Performance Index 2000,
#                         stratified by school type (stype), weights pw, fpc
#                         (every school its own PSU), with the api00 score
#   apiclus1-banner.csv   the one-stage cluster sample of 15 districts (dnum),
#                         fpc, api00; plus 15 JK1 replicate weights repw1..repw15
#                         (full weights, as.svrepdesign(type = "JK1") of the
#                         design without fpc), for the replicate case
# Replicate variance is centred at the mean of the replicates
# (survey.replicates.mse = FALSE), tabsight's default.
suppressMessages(library(survey))
options(survey.replicates.mse = FALSE, survey.adjust.domain.lonely = FALSE)

root <- normalizePath(file.path(dirname(sub("--file=", "", grep("--file=", commandArgs(FALSE), value = TRUE))), ".."))
out_dir <- file.path(root, "fixtures", "reference")
data_dir <- file.path(out_dir, "survey-data")
source(file.path(root, "scripts", "survey_json.R"))  # num() and to_json()

# ---- the api data with the score, as CSV ------------------------------------------------------
data(api)
meals3 <- function(x) as.character(cut(x, c(-1, 33, 66, 100), labels = c("low", "mid", "high")))
strat <- data.frame(stype = as.character(apistrat$stype), pw = apistrat$pw, fpc = apistrat$fpc,
                    sch.wide = as.character(apistrat$sch.wide), awards = as.character(apistrat$awards),
                    meals3 = meals3(apistrat$meals), api00 = apistrat$api00)
write.csv(strat, file.path(data_dir, "apistrat-banner.csv"), row.names = FALSE, quote = FALSE, na = "")
clus1 <- data.frame(dnum = apiclus1$dnum, pw = apiclus1$pw, fpc = apiclus1$fpc, stype = as.character(apiclus1$stype),
                    sch.wide = as.character(apiclus1$sch.wide), awards = as.character(apiclus1$awards),
                    meals3 = meals3(apiclus1$meals), api00 = apiclus1$api00)
jk1 <- as.svrepdesign(svydesign(id = ~dnum, weights = ~pw, data = clus1), type = "JK1")
repw <- weights(jk1, type = "analysis")
colnames(repw) <- paste0("repw", seq_len(ncol(repw)))
write.csv(cbind(clus1, repw), file.path(data_dir, "apiclus1-banner.csv"), row.names = FALSE, quote = FALSE, na = "")

read_data <- function(name) read.csv(file.path(data_dir, name), colClasses = "character", na.strings = "")
numeric_columns <- function(df, cols) { for (col in cols) df[[col]] <- as.numeric(df[[col]]); df }

nh <- numeric_columns(read_data("nhanes.csv"), c("WTMEC2YR"))
st <- numeric_columns(read_data("apistrat-banner.csv"), c("pw", "fpc", "api00"))
cl <- numeric_columns(read_data("apiclus1-banner.csv"), c("pw", "fpc", "api00", paste0("repw", 1:15)))

# ---- one question against one break ------------------------------------------------------------
present <- function(d, cols) Reduce(`&`, lapply(cols, function(col) !is.na(d$variables[[col]])))

shares <- function(d, q, b, df) {
  levels <- sort(unique(d$variables[[q]][!is.na(d$variables[[q]])]))
  out <- list(); diffs <- list()
  for (level in levels) {
    dq <- d[present(d, q), ]
    dq <- update(dq, .ind = as.numeric(dq$variables[[q]] == level))
    m <- svymean(~.ind, dq)
    out[[length(out) + 1]] <- list(question = q, level = level, break_ = NULL, column = "Total", estimate = coef(m)[[1]], standardError = SE(m)[[1]])
    dc <- d[present(d, c(q, b)), ]
    dc <- update(dc, .ind = as.numeric(dc$variables[[q]] == level), .by = factor(dc$variables[[b]]))
    by <- svyby(~.ind, ~.by, dc, svymean, covmat = TRUE)
    cols <- as.character(by$.by)
    for (k in seq_along(cols)) out[[length(out) + 1]] <- list(question = q, level = level, break_ = b, column = cols[k], estimate = coef(by)[[k]], standardError = SE(by)[[k]])
    diffs <- c(diffs, contrasts(by, cols, df, list(question = q, level = level, break_ = b)))
  }
  list(shares = out, differences = diffs)
}

contrasts <- function(by, cols, df, what) {
  out <- list()
  if (length(cols) < 2) return(out)
  for (a in 1:(length(cols) - 1)) for (c in (a + 1):length(cols)) {
    w <- rep(0, length(cols)); w[a] <- 1; w[c] <- -1
    k <- svycontrast(by, w)
    t <- coef(k)[[1]] / SE(k)[[1]]
    out[[length(out) + 1]] <- c(what, list(first = cols[a], second = cols[c], difference = coef(k)[[1]], standardError = SE(k)[[1]], t = t, pValue = 2 * pt(-abs(t), df)))
  }
  out
}

means <- function(d, x, b, df) {
  dx <- d[present(d, x), ]
  m <- svymean(as.formula(paste0("~", x)), dx)
  out <- list(list(question = x, break_ = NULL, column = "Total", estimate = coef(m)[[1]], standardError = SE(m)[[1]]))
  dc <- d[present(d, c(x, b)), ]
  dc <- update(dc, .by = factor(dc$variables[[b]]))
  by <- svyby(as.formula(paste0("~", x)), ~.by, dc, svymean, covmat = TRUE)
  cols <- as.character(by$.by)
  for (k in seq_along(cols)) out[[length(out) + 1]] <- list(question = x, break_ = b, column = cols[k], estimate = coef(by)[[k]], standardError = SE(by)[[k]])
  list(means = out, differences = contrasts(by, cols, df, list(question = x, break_ = b)))
}

overall <- function(d, q, b, df) {
  dc <- d[present(d, c(q, b)), ]
  dc <- update(dc, .q = factor(dc$variables[[q]]), .b = factor(dc$variables[[b]]))
  f <- svychisq(~.q + .b, dc, statistic = "F")
  ndf <- f$parameter[["ndf"]]
  list(question = q, break_ = b, F = f$statistic[[1]], ndf = ndf, libraryDdf = f$parameter[["ddf"]], ddf = ndf * df,
       pValue = pf(f$statistic[[1]], ndf, ndf * df, lower.tail = FALSE))
}

case <- function(name, data, args, d, df, questions, breaks, numeric) {
  s <- list(); diffs <- list(); m <- list(); mdiffs <- list(); o <- list()
  for (q in questions) for (b in breaks) {
    r <- shares(d, q, b, df)
    # the Total is recorded once per question
    s <- c(s, Filter(function(x) !is.null(x$break_) || b == breaks[1], r$shares)); diffs <- c(diffs, r$differences)
    o[[length(o) + 1]] <- overall(d, q, b, df)
  }
  for (x in numeric) for (b in breaks) {
    r <- means(d, x, b, df)
    m <- c(m, Filter(function(v) !is.null(v$break_) || b == breaks[1], r$means)); mdiffs <- c(mdiffs, r$differences)
  }
  rename <- function(items) lapply(items, function(x) { names(x)[names(x) == "break_"] <- "break"; if (is.null(x[["break"]])) x[["break"]] <- NULL; x })
  list(name = name, data = data, args = I(args), designDf = df, questions = if (length(questions)) I(questions) else list(), breaks = I(breaks), means = if (length(numeric)) I(numeric) else list(),
       shares = rename(s), differences = rename(diffs), domainMeans = rename(m), meanDifferences = rename(mdiffs), overall = rename(o))
}

dnh <- svydesign(id = ~SDMVPSU, strata = ~SDMVSTRA, weights = ~WTMEC2YR, nest = TRUE, data = nh)
dst <- svydesign(id = ~1, strata = ~stype, weights = ~pw, fpc = ~fpc, data = st)
dcl <- svydesign(id = ~dnum, weights = ~pw, fpc = ~fpc, data = cl)
dcl_jk1 <- svrepdesign(data = cl, repweights = "repw[0-9]+", weights = ~pw, type = "JK1", combined.weights = TRUE, mse = FALSE)

cases <- list(
  case("nhanes: 15 strata, 31 PSUs (nested), domain rows where HI_CHOL is missing", "nhanes.csv",
       c("--weight", "WTMEC2YR", "--strata", "SDMVSTRA", "--cluster", "SDMVPSU"), dnh, 31 - 15,
       c("HI_CHOL", "agecat"), c("race", "RIAGENDR"), character(0)),
  case("apistrat: stratified by school type, fpc, every school its own PSU", "apistrat-banner.csv",
       c("--weight", "pw", "--strata", "stype", "--fpc", "fpc"), dst, 200 - 3,
       c("sch.wide", "meals3"), c("awards", "stype"), c("api00")),
  case("apiclus1: one-stage cluster sample of 15 districts, fpc", "apiclus1-banner.csv",
       c("--weight", "pw", "--cluster", "dnum", "--fpc", "fpc", "--min-base", "10"), dcl, 15 - 1,
       c("sch.wide", "meals3"), c("stype", "awards"), c("api00")),
  case("apiclus1: 15 JK1 replicate weights", "apiclus1-banner.csv",
       c("--weight", "pw", "--replicate-weights", "repw*", "--replicate-method", "jk1", "--min-base", "10"), dcl_jk1, 15 - 1,
       c("sch.wide", "meals3"), c("stype", "awards"), c("api00"))
)
# The means of HI_CHOL (0/1) by race: a numeric question of the NHANES design, with its domain rows.
cases[[length(cases) + 1]] <- case("nhanes: mean of HI_CHOL", "nhanes.csv",
  c("--weight", "WTMEC2YR", "--strata", "SDMVSTRA", "--cluster", "SDMVPSU"), update(dnh, HI_CHOL = as.numeric(HI_CHOL)), 31 - 15,
  character(0), c("race"), c("HI_CHOL"))

out <- list(
  recordedWith = list(library = "survey (R)", debianPackage = "r-cran-survey", version = as.character(packageVersion("survey")),
                      R = paste(R.version$major, R.version$minor, sep = ".")),
  cases = cases
)
writeLines(to_json(out), file.path(out_dir, "banner-design-reference.json"))
cat("wrote", file.path(out_dir, "banner-design-reference.json"), "\n")
