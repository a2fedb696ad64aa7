# Reference per-step threshold probabilities for ForecastHub.Core risk tests (RiskReferenceTests).
# Run from the repository root:  Rscript tests/reference/risk-fixtures.R
# Needs only base R (stats). A plain demeaned AR(p) (seasonality none, Gaussian intervals) fitted by
# R ar() (Yule-Walker, AIC order choice, order.max = floor(10 log10 n)) and predict.ar up to 24
# steps; the chance of each step lying below / above a threshold is pnorm(c, pred, se) and
# pnorm(c, pred, se, lower.tail = FALSE).
out_dir <- file.path("tests", "ForecastHub.Core.Tests", "Fixtures")
stopifnot(dir.exists(out_dir))
num <- function(x) sprintf("%.17g", x)
arr <- function(x) paste0("[", paste(num(as.vector(x)), collapse = ","), "]")
obj <- function(...) {
  kv <- list(...)
  paste0("{", paste(sprintf('"%s":%s', names(kv), unlist(kv)), collapse = ","), "}")
}
r_version <- paste(R.version$major, R.version$minor, sep = ".")

set.seed(23)
x <- round(as.numeric(arima.sim(list(ar = c(0.7, -0.2)), n = 365, sd = 1.8)) + 1.5, 3)
fit <- ar(x, method = "yule-walker")
pr <- predict(fit, n.ahead = 24)
thresholds <- c(-2, 0, 1.5, 3.25)
below <- sapply(thresholds, function(c) pnorm(c, as.numeric(pr$pred), as.numeric(pr$se)))
above <- sapply(thresholds, function(c) pnorm(c, as.numeric(pr$pred), as.numeric(pr$se), lower.tail = FALSE))
json <- obj(
  source = sprintf('"R %s stats::ar (yule-walker), predict.ar and pnorm; series simulated in R, seed 23"', r_version),
  values = arr(x),
  order = num(fit$order),
  thresholds = arr(thresholds),
  below = paste0("[", paste(apply(below, 1, arr), collapse = ","), "]"),
  above = paste0("[", paste(apply(above, 1, arr), collapse = ","), "]"))
writeLines(json, file.path(out_dir, "pnorm-step-probabilities.json"))
cat("wrote pnorm-step-probabilities.json\n")
