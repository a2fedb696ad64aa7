# Candidate model changes screened on the year settings are chosen on (Seattle 2014; every model fitted on
# the data before each day, from 2012, window 1,095 days), one day ahead, in R for speed. Base R only.
# Run from the repository root:  Rscript tests/benchmarks/seattle-candidates.R   (a few minutes)
# The anomaly is y minus an lm fit of K annual harmonic pairs (doy 0-based / 365.25, as the service);
# the AR order is R's ar.burg AIC choice up to 10 (close to the service's PACF-proposed AIC choice).
sea <- read.csv(file.path("tests", "ForecastHub.Core.Tests", "Fixtures", "seattle-weather.csv"))
dates <- as.Date(sea$date)
doy <- as.POSIXlt(dates)$yday
targets <- which(format(dates, "%Y") == "2014")
design <- function(K) {
  X <- matrix(1, length(doy), 1)
  for (k in seq_len(K)) X <- cbind(X, cos(2 * pi * k * doy / 365.25), sin(2 * pi * k * doy / 365.25))
  X
}
lagged <- function(a, idx, p) matrix(sapply(1:p, function(i) a[idx - i]), ncol = p)

# One candidate: a function of (anomalies so far, doy so far, doy of the target) giving the anomaly forecast.
run <- function(y, K, predict_anomaly) {
  X <- design(K)
  sapply(targets, function(t) {
    known <- max(1, t - 1095):(t - 1)
    f <- lm.fit(X[known, , drop = FALSE], y[known])
    sum(X[t, ] * f$coefficients) + predict_anomaly(f$residuals, doy[known], doy[t])
  })
}
burg_aic <- function(a, d, dt) { f <- ar.burg(a, order.max = 10, demean = FALSE); if (f$order == 0) 0 else sum(f$ar * rev(tail(a, f$order))) }
akaike_weights <- function(a, d, dt) {
  fits <- lapply(1:8, function(p) ar.burg(a, aic = FALSE, order.max = p, demean = FALSE))
  aic <- sapply(1:8, function(p) length(a) * log(fits[[p]]$var.pred) + 2 * p)
  w <- exp(-(aic - min(aic)) / 2)
  sum(w / sum(w) * sapply(fits, function(f) sum(f$ar * rev(tail(a, f$order)))))
}
arma11 <- function(a, d, dt) predict(arima(a, order = c(1, 0, 1), include.mean = FALSE), 1)$pred[1]
# Seasonal coefficients on lags 1..q of the AIC order, fitted by least squares; used always, or when the AIC prefers them.
seasonal <- function(q, decide, pfix = NA) function(a, d, dt) {
  p <- if (is.na(pfix)) max(1, ar.burg(a, order.max = 10, demean = FALSE)$order) else pfix
  idx <- (p + 1):length(a); q <- min(p, q); L <- lagged(a, idx, p); ang <- 2 * pi * d[idx] / 365.25
  Z <- cbind(L, L[, 1:q] * cos(ang), L[, 1:q] * sin(ang))
  fc <- lm.fit(L, a[idx]); fs <- lm.fit(Z, a[idx]); m <- length(idx)
  lt <- rev(tail(a, p)); at <- 2 * pi * dt / 365.25
  use <- !decide || m * log(sum(fs$residuals^2) / m) + 2 * ncol(Z) < m * log(sum(fc$residuals^2) / m) + 2 * p
  if (use) sum(fs$coefficients * c(lt, lt[1:q] * cos(at), lt[1:q] * sin(at))) else sum(fc$coefficients * lt)
}

candidates <- list(
  "AR by AIC, K = 2 (the service's form)" = list(2, burg_aic),
  "AR by AIC, K = 3" = list(3, burg_aic),
  "AR by AIC, K = 4" = list(4, burg_aic),
  "Akaike-weighted AR(1..8)" = list(2, akaike_weights),
  "ARMA(1,1) on the anomaly" = list(2, arma11),
  "AR(2), all coefficients seasonal" = list(2, seasonal(2, FALSE, 2)),
  "AR by AIC, lags 1-2 seasonal always" = list(2, seasonal(2, FALSE)),
  "AR by AIC, lags 1-2 seasonal when the AIC prefers (tried, not kept)" = list(2, seasonal(2, TRUE)))
cat(R.version.string, "\n")
cat("| candidate | max MAE | max RMSE | min MAE | min RMSE |\n| --- | --- | --- | --- | --- |\n")
for (name in names(candidates)) {
  r <- sapply(c("temp_max", "temp_min"), function(s) {
    y <- sea[[s]]; e <- y[targets] - run(y, candidates[[name]][[1]], candidates[[name]][[2]])
    c(mean(abs(e)), sqrt(mean(e^2)))
  })
  cat(sprintf("| %s | %.3f | %.3f | %.3f | %.3f |\n", name, r[1, 1], r[2, 1], r[1, 2], r[2, 2]))
}
