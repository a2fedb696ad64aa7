# Reference values for ForecastHub.Core climatology and verification tests.
# Run from the repository root:  Rscript tests/reference/climatology-fixtures.R
# Needs only base R (stats); writes JSON fixtures to tests/ForecastHub.Core.Tests/Fixtures/.
# Harmonic design (must match ForecastHub.Core.Climatology.HarmonicDesign):
#   daily series:  doy = 0-based day of year of the local date
#   hourly series: local standard time s = UTC + the zone's standard offset;
#                  doy = 0-based day of year of s + hour(s)/24, hour = hour(s)
#   columns: 1, cos/sin(2 pi k doy / 365.25) k = 1..K, cos/sin(2 pi j hour / 24) j = 1..J

out_dir <- file.path("tests", "ForecastHub.Core.Tests", "Fixtures")
stopifnot(dir.exists(out_dir))

num <- function(x) {
  s <- trimws(formatC(x, digits = 15, format = "g"))
  s[!is.finite(x)] <- "null"
  s
}
arr <- function(x) paste0("[", paste(num(x), collapse = ","), "]")
obj <- function(...) {
  kv <- list(...)
  paste0("{", paste(sprintf('"%s":%s', names(kv), unlist(kv)), collapse = ","), "}")
}
str <- function(x) sprintf('"%s"', x)
write_fixture <- function(name, json) {
  writeLines(json, file.path(out_dir, name))
  cat("wrote", name, "\n")
}

design <- function(doy, hour, K, J) {
  cols <- list(level = rep(1, length(doy)))
  if (K > 0) for (k in 1:K) {
    cols[[sprintf("annual-cos-%d", k)]] <- cos(2 * pi * k * doy / 365.25)
    cols[[sprintf("annual-sin-%d", k)]] <- sin(2 * pi * k * doy / 365.25)
  }
  if (J > 0) for (j in 1:J) {
    cols[[sprintf("diurnal-cos-%d", j)]] <- cos(2 * pi * j * hour / 24)
    cols[[sprintf("diurnal-sin-%d", j)]] <- sin(2 * pi * j * hour / 24)
  }
  as.matrix(as.data.frame(cols, check.names = FALSE))
}

lm_json <- function(X, y) {
  fit <- lm(y ~ X - 1)
  s <- summary(fit)
  obj(terms = paste0("[", paste(str(colnames(X)), collapse = ","), "]"),
      coefficients = arr(unname(coef(fit))),
      stdErrors = arr(unname(s$coefficients[, 2])),
      sigma = num(s$sigma), df = num(fit$df.residual))
}

r_version <- R.version.string

# 1. Seattle daily max and min (vega-datasets 3.2.1), annual harmonics K = 2, lm.
sea <- read.csv(file.path(out_dir, "seattle-weather.csv"))
doy <- as.POSIXlt(as.Date(sea$date), tz = "UTC")$yday
Xd <- design(doy, 0, 2, 0)
# Regression with AR(1) errors by exact ML (arima with xreg) on 2012-2014, for the GLS check.
train <- as.Date(sea$date) < as.Date("2015-01-01")
arx <- function(y) {
  f <- arima(y[train], order = c(1, 0, 0), xreg = Xd[train, -1], method = "ML")
  obj(coefficients = arr(unname(coef(f)[-1])), ar1 = num(unname(coef(f)[1])),
      stdErrors = arr(unname(sqrt(diag(f$var.coef))[-1])))
}
write_fixture("climatology-seattle.json", obj(
  source = str(paste("R stats::lm and stats::arima(xreg), ", r_version)),
  annualHarmonics = "2", diurnalHarmonics = "0",
  tempMax = lm_json(Xd, sea$temp_max), tempMin = lm_json(Xd, sea$temp_min),
  arimaXregTrain = obj(tempMax = arx(sea$temp_max), tempMin = arx(sea$temp_min))))

# 2. Simulated hourly series, two years, zone Europe/Berlin (standard offset +1 h),
#    annual K = 2 and diurnal J = 3 on local standard time.
set.seed(20240501)
n <- 2 * 8760
t0 <- as.numeric(as.POSIXct("2022-01-01 00:00:00", tz = "UTC"))
epoch <- t0 + 3600 * (0:(n - 1))
s <- as.POSIXlt(epoch + 3600, origin = "1970-01-01", tz = "UTC")
hour <- s$hour
doyh <- s$yday + hour / 24
truth <- 9 - 8 * cos(2 * pi * (doyh - 20) / 365.25) - 4 * cos(2 * pi * (hour - 15) / 24) + 0.7 * sin(4 * pi * hour / 24)
y <- round(truth + as.numeric(arima.sim(list(ar = c(1.2, -0.3)), n = n, sd = 0.6)), 3)
Xh <- design(doyh, hour, 2, 3)
write_fixture("climatology-hourly-berlin.json", obj(
  source = str(paste("R stats::lm,", r_version, "; series simulated in R, seed 20240501")),
  timeZone = str("Europe/Berlin"), annualHarmonics = "2", diurnalHarmonics = "3",
  firstEpochSeconds = num(t0), stepSeconds = "3600", values = arr(y), lm = lm_json(Xh, y)))

# 3. CRPS of a Gaussian forecast: closed form (Gneiting and Raftery 2007, eq. 21) checked
#    against numerical integration of (F(x) - 1{x >= y})^2 over the real line.
crps_num <- function(mu, sigma, y) {
  f1 <- function(x) pnorm(x, mu, sigma)^2
  f2 <- function(x) (1 - pnorm(x, mu, sigma))^2
  integrate(f1, -Inf, y, rel.tol = 1e-12)$value + integrate(f2, y, Inf, rel.tol = 1e-12)$value
}
cases <- rbind(c(0, 1, 0), c(0, 1, 1.5), c(2, 0.5, 1), c(-3, 2.5, 4), c(10, 3, 10.2))
write_fixture("crps-gaussian.json", obj(
  source = str(paste("R stats::integrate,", r_version)),
  mu = arr(cases[, 1]), sigma = arr(cases[, 2]), y = arr(cases[, 3]),
  crps = arr(apply(cases, 1, function(r) crps_num(r[1], r[2], r[3])))))

# 4. Plain demeaned AR(p) (seasonality none, Gaussian intervals): R ar() with AIC order choice
#    (order.max = floor(10 log10 n)) and predict() up to 24 steps, for Yule-Walker, Burg and OLS.
set.seed(7)
x <- round(as.numeric(arima.sim(list(ar = c(0.6, -0.25, 0.15)), n = 400)) + 12, 4)
pred_json <- function(fit) {
  pr <- predict(fit, n.ahead = 24)
  obj(order = num(fit$order), mean = arr(as.numeric(pr$pred)), se = arr(as.numeric(pr$se)))
}
write_fixture("plain-ar-predict.json", obj(
  source = str(paste("R stats::ar and predict.ar,", r_version, "; series simulated in R, seed 7")),
  values = arr(x),
  yuleWalker = pred_json(ar(x, method = "yule-walker")),
  burg = pred_json(ar(x, method = "burg")),
  leastSquares = pred_json(ar(x, method = "ols"))))
