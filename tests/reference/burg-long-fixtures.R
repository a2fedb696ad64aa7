# Writes the long-series Burg reference fixture read by ForecastHub.Core.Tests (BurgLongSeriesTests).
# Run from the repository root:  Rscript tests/reference/burg-long-fixtures.R
# Needs only base R (stats). The series is 40,000 points of an AR(2) driven by a deterministic
# sawtooth, x[t] = 0.6 x[t-1] - 0.2 x[t-2] + ((7919 t) mod 10007) / 10007 - 0.5: integer arithmetic
# and IEEE + - * / only, so the test builds the very same doubles instead of reading 40,000 numbers.
# Long enough that ForecastHub sweeps each Burg order as two halves side by side. Orders up to 46 for
# the AIC choice: ForecastHub caps the order at floor(10 log10 n), 46 here, where R takes order.max as given.
args <- commandArgs(trailingOnly = FALSE)
script <- sub("^--file=", "", args[grep("^--file=", args)])
root <- normalizePath(file.path(dirname(script), "..", ".."))
out <- file.path(root, "tests", "ForecastHub.Core.Tests", "Fixtures", "burg-long.json")

num <- function(x) sprintf("%.17g", x)
arr <- function(x) paste0("[", paste(num(as.vector(x)), collapse = ","), "]")
obj <- function(...) {
  l <- list(...)
  paste0("{", paste(sprintf("\"%s\":%s", names(l), unlist(l)), collapse = ","), "}")
}

n <- 40000
x <- numeric(n)
for (t in seq_len(n)) {
  e <- ((7919 * t) %% 10007) / 10007 - 0.5
  x1 <- if (t > 1) x[t - 1] else 0
  x2 <- if (t > 2) x[t - 2] else 0
  x[t] <- 0.6 * x1 - 0.2 * x2 + e
}

fit_json <- function(fit) obj(order = fit$order, coef = arr(fit$ar), varPred = num(fit$var.pred),
                              xMean = num(fit$x.mean), partialacf = arr(fit$partialacf))
json <- obj(
  source = sprintf("\"R %s stats::ar.burg on the deterministic AR(2) of tests/reference/burg-long-fixtures.R\"",
                   paste(R.version$major, R.version$minor, sep = ".")),
  rVersion = sprintf("\"%s\"", R.version.string),
  n = n, first = arr(x[1:5]), last = arr(x[(n - 4):n]),
  burg1Order12 = fit_json(ar.burg(x, aic = FALSE, order.max = 12, var.method = 1)),
  burg2Order12 = fit_json(ar.burg(x, aic = FALSE, order.max = 12, var.method = 2)),
  burg1Aic46 = fit_json(ar.burg(x, order.max = 46, var.method = 1)))
writeLines(json, out)
cat("wrote", out, "\n")
