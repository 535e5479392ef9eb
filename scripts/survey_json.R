# JSON for the survey reference scripts (record_survey_reference.R,
# record_survey_commands.R): every double to 17 significant digits, so that
# values read back exactly.
num <- function(x) ifelse(is.na(x), "null", ifelse(is.infinite(x), ifelse(x > 0, "1e999", "-1e999"), sprintf("%.17g", x)))
to_json <- function(x) {
  if (is.null(x)) return("null")
  if (is.list(x)) {
    if (!is.null(names(x)) && all(names(x) != "")) {
      return(paste0("{", paste0('"', names(x), '":', vapply(x, to_json, ""), collapse = ","), "}"))
    }
    return(paste0("[", paste(vapply(x, to_json, ""), collapse = ","), "]"))
  }
  if (inherits(x, "AsIs") || length(x) != 1) {
    inner <- if (is.character(x)) paste0('"', x, '"') else if (is.logical(x)) tolower(as.character(x)) else num(as.numeric(x))
    return(paste0("[", paste(inner, collapse = ","), "]"))
  }
  if (is.character(x)) return(paste0('"', gsub('"', '\\\\"', x), '"'))
  if (is.logical(x)) return(tolower(as.character(x)))
  num(as.numeric(x))
}
