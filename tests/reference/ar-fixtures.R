# Writes the AR reference fixture read by ForecastHub.Core.Tests (ArReferenceTests).
# Run from the repository root:  Rscript tests/reference/ar-fixtures.R
# Needs R's stats package (Debian r-base-core) and tseries for jarque.bera.test (Debian
# r-cran-tseries); JSON is written by hand with %.17g so every double round-trips exactly.
suppressPackageStartupMessages(library(tseries))

args <- commandArgs(trailingOnly = FALSE)
script <- sub("^--file=", "", args[grep("^--file=", args)])
root <- normalizePath(file.path(dirname(script), "..", ".."))
out <- file.path(root, "tests", "ForecastHub.Core.Tests", "Fixtures", "ar-reference.json")

num <- function(x) sprintf("%.17g", x)
arr <- function(x) paste0("[", paste(num(as.vector(x)), collapse = ","), "]")
str <- function(x) paste0("\"", gsub("\"", "\\\\\"", x), "\"")
obj <- function(...) {
  l <- list(...)
  paste0("{", paste(sprintf("\"%s\":%s", names(l), unlist(l)), collapse = ","), "}")
}
list_json <- function(items) paste0("[", paste(items, collapse = ","), "]")

box <- function(res, p, lag) {
  b <- Box.test(res, lag = lag, type = "Ljung-Box", fitdf = p)
  obj(lag = lag, fitdf = p, statistic = num(b$statistic), df = num(b$parameter), pValue = num(b$p.value))
}

moments_json <- function(res) {
  m <- mean(res)
  m2 <- mean((res - m)^2)
  jb <- jarque.bera.test(res)
  obj(count = length(res), mean = num(m), sd = num(sd(res)), skewness = num(mean((res - m)^3) / m2^1.5),
      kurtosis = num(mean((res - m)^4) / m2^2), jarqueBera = num(jb$statistic), jarqueBeraP = num(jb$p.value))
}

ar_json <- function(fit, x, lag) {
  p <- fit$order
  se <- if (p > 0) sqrt(diag(as.matrix(fit$asy.var.coef))) else numeric()
  pr <- predict(fit, n.ahead = 24)
  obj(order = p, coef = arr(fit$ar), varPred = num(fit$var.pred), xMean = num(fit$x.mean),
      aic = arr(fit$aic), se = arr(se),
      predictMean = arr(pr$pred), predictSe = arr(pr$se),
      box = box(na.omit(fit$resid), p, lag), residuals = moments_json(as.numeric(na.omit(fit$resid))))
}

ols_json <- function(fit, x, lag) {
  p <- fit$order
  pr <- predict(fit, n.ahead = 24)
  obj(order = p, coef = arr(fit$ar), varPred = num(fit$var.pred), xMean = num(fit$x.mean),
      intercept = num(fit$x.intercept), aic = arr(fit$aic), se = arr(fit$asy.se.coef$ar),
      predictMean = arr(pr$pred), predictSe = arr(pr$se),
      box = box(na.omit(fit$resid), p, lag))
}

# RSS / rows for orders 0..K on the common rows t = K+1..n (what ForecastHub compares orders on).
ols_common <- function(x, K) {
  E <- embed(x - mean(x), K + 1)
  y <- E[, 1]
  sapply(0:K, function(m) {
    fit <- if (m == 0) lm(y ~ 1) else lm(y ~ E[, 2:(m + 1), drop = FALSE])
    mean(residuals(fit)^2)
  })
}

# Parameters come from a tightly converged fit (R's default reltol 1e-8 leaves the mean of a
# near-unit-root series about 1e-3 off); defaultLoglik is R's default fit, which ours must not trail.
ml_json <- function(x, p, lag) {
  default <- arima(x, order = c(p, 0, 0), method = "ML")
  fit <- arima(x, order = c(p, 0, 0), method = "ML", optim.control = list(reltol = 1e-14, maxit = 1000))
  phi <- if (p > 0) coef(fit)[1:p] else numeric()
  mu <- coef(fit)[["intercept"]]
  se <- sqrt(diag(fit$var.coef))
  pr <- predict(fit, n.ahead = 24)
  res <- if (p > 0) embed(x - mu, p + 1) %*% c(1, -phi) else x - mu
  obj(order = p, code = fit$code, coef = arr(phi), intercept = num(mu), sigma2 = num(fit$sigma2),
      loglik = num(fit$loglik), aic = num(fit$aic), bic = num(BIC(fit)), defaultLoglik = num(default$loglik),
      defaultCode = default$code, optimControl = str("reltol = 1e-14, maxit = 1000"),
      se = arr(if (p > 0) se[1:p] else numeric()), interceptSe = num(se[["intercept"]]),
      predictMean = arr(pr$pred), predictSe = arr(pr$se),
      box = box(res, p, lag))
}

series_json <- function(name, x, mlOrders, lag) {
  x <- as.numeric(x)
  n <- length(x)
  K <- min(n - 1, floor(10 * log10(n)))
  yw <- ar.yw(x, order.max = K)
  burg1 <- ar.burg(x, order.max = K, var.method = 1)
  burg2 <- ar.burg(x, order.max = K, var.method = 2)
  ols <- ar.ols(x, order.max = K, demean = TRUE, intercept = TRUE)
  ml <- sapply(mlOrders, function(p) ml_json(x, p, lag))
  obj(name = str(name), values = arr(x), orderMax = K,
      acf = arr(acf(x, lag.max = K, plot = FALSE)$acf),
      pacf = arr(pacf(x, lag.max = K, plot = FALSE)$acf),
      band = num(qnorm(0.975) / sqrt(n)),
      yuleWalker = ar_json(yw, x, lag),
      yuleWalkerOrder2 = ar_json(ar.yw(x, aic = FALSE, order.max = 2), x, lag),
      burg1 = ar_json(burg1, x, lag), burg2 = ar_json(burg2, x, lag),
      leastSquares = ols_json(ols, x, lag),
      leastSquaresOrder2 = ols_json(ar.ols(x, aic = FALSE, order.max = 2, demean = TRUE, intercept = TRUE), x, lag),
      leastSquaresCommonVariance = arr(ols_common(x, K)),
      maxLikelihood = list_json(ml))
}

set.seed(20240606)
ar1 <- arima.sim(list(ar = 0.97), n = 500)
set.seed(20240602)
ar3 <- arima.sim(list(ar = c(0.5, -0.3, 0.2)), n = 400) + 10

# Two segments of the AR(3) series: ML via arima with a 2000-point NA gap (the Kalman filter
# forgets across it: 0.83^2000 underflows), least squares via lm on rows stacked from both segments.
seg1 <- as.numeric(ar3[1:150])
seg2 <- as.numeric(ar3[151:400])
gapped <- c(seg1, rep(NA, 2000), seg2)
mlgap <- arima(gapped, order = c(3, 0, 0), method = "ML", optim.control = list(reltol = 1e-14, maxit = 1000))
xm <- mean(c(seg1, seg2))
rows <- rbind(embed(seg1 - xm, 4), embed(seg2 - xm, 4))
olsgap <- lm(rows[, 1] ~ rows[, 2:4])
segments <- obj(
  segment1 = arr(seg1), segment2 = arr(seg2),
  maxLikelihood = obj(order = 3, coef = arr(coef(mlgap)[1:3]), intercept = num(coef(mlgap)[["intercept"]]),
                      sigma2 = num(mlgap$sigma2), loglik = num(mlgap$loglik)),
  leastSquares = obj(order = 3, coef = arr(coef(olsgap)[2:4]), intercept = num(coef(olsgap)[[1]]),
                     varPred = num(mean(residuals(olsgap)^2)),
                     se = arr(summary(olsgap)$coefficients[2:4, 2] * sqrt((nrow(rows) - 4) / nrow(rows)))))

version <- R.version.string
json <- obj(
  source = str("R stats package (acf, pacf, ar.yw, ar.burg, ar.ols, arima, predict, Box.test, lm, BIC); tseries jarque.bera.test"),
  tseriesVersion = str(as.character(packageVersion("tseries"))),
  rVersion = str(paste(version, R.version$nickname)),
  generatedBy = str("tests/reference/ar-fixtures.R"),
  series = list_json(c(
    series_json("LakeHuron", LakeHuron, c(1, 2), 10),
    series_json("lh", lh, c(1, 3), 10),
    series_json("ar1-0.97", ar1, c(1), 20),
    series_json("ar3", ar3, c(2, 3), 20))),
  segments = segments)
writeLines(json, out)
cat("wrote", out, "\n")
