# The general-purpose peer on Seattle 2015, one day ahead, for the day-ahead skill benchmark.
# Run from the repository root:  Rscript tests/reference/seattle-peer-fixtures.R   (about 3 CPU minutes)
# Needs Debian r-base-core (R 4.2) and r-cran-forecast (8.20).
# Writes tests/ForecastHub.Core.Tests/Fixtures/seattle-peer-2015.json (the test year) and
# seattle-peer-2014.json (the same for 2014, trained on 2012-2013: the year settings are chosen on).
#
# Data: Seattle daily temp_max and temp_min (NOAA via vega-datasets 3.2.1, seattle-weather.csv).
# Origins: every day of the year before each target day; each forecasts the next day from all data so far.
# (a) persistence: tomorrow = today; its Gaussian spread is the sd of the day-to-day changes so far.
# (b) auto.arima(y, xreg = fourier(K = 2), seasonal = FALSE): the order (and mean/drift) re-selected
#     every 30 origins, the coefficients re-estimated at every origin by Arima on all data so far;
#     forecast() gives the mean and 80 %/95 % intervals, sd = (upper95 - mean) / qnorm(0.975).
# Both: P(value < 0 C) = pnorm(0, mean, sd) (Gaussian, as the peer's intervals are).

suppressPackageStartupMessages(library(forecast))
out_dir <- file.path("tests", "ForecastHub.Core.Tests", "Fixtures")
stopifnot(dir.exists(out_dir))

num <- function(x) {
  s <- trimws(formatC(x, digits = 10, format = "g"))
  s[!is.finite(x)] <- "null"
  s
}
arr <- function(x) paste0("[", paste(num(x), collapse = ","), "]")
strs <- function(x) paste0("[", paste(sprintf('"%s"', x), collapse = ","), "]")

sea <- read.csv(file.path(out_dir, "seattle-weather.csv"))
dates <- as.Date(sea$date)
reselect_every <- 30

run_series <- function(y, targets) {
  X <- fourier(ts(y, frequency = 365.25), K = 2)
  n_out <- length(targets)
  out <- list(mean = numeric(n_out), sd = numeric(n_out), lower80 = numeric(n_out), upper80 = numeric(n_out),
              lower95 = numeric(n_out), upper95 = numeric(n_out), pBelow0 = numeric(n_out),
              persistence = numeric(n_out), persistenceSd = numeric(n_out), persistencePBelow0 = numeric(n_out),
              order = character(n_out))
  spec <- NULL
  for (i in seq_along(targets)) {
    t <- targets[i]
    known <- 1:(t - 1)
    yk <- ts(y[known], frequency = 365.25)
    Xk <- X[known, , drop = FALSE]
    if ((i - 1) %% reselect_every == 0) {
      sel <- auto.arima(yk, xreg = Xk, seasonal = FALSE)
      spec <- list(order = arimaorder(sel)[1:3],
                   mean = "intercept" %in% names(coef(sel)),
                   drift = "drift" %in% names(coef(sel)))
    }
    fit <- Arima(yk, order = spec$order, xreg = Xk, include.mean = spec$mean, include.drift = spec$drift)
    fc <- forecast(fit, xreg = X[t, , drop = FALSE], level = c(80, 95))
    m <- as.numeric(fc$mean)
    s <- (as.numeric(fc$upper[, 2]) - m) / qnorm(0.975)
    out$mean[i] <- m
    out$sd[i] <- s
    out$lower80[i] <- fc$lower[, 1]
    out$upper80[i] <- fc$upper[, 1]
    out$lower95[i] <- fc$lower[, 2]
    out$upper95[i] <- fc$upper[, 2]
    out$pBelow0[i] <- pnorm(0, m, s)
    out$order[i] <- sprintf("ARIMA(%d,%d,%d)%s%s", spec$order[1], spec$order[2], spec$order[3],
                            if (spec$mean) " with mean" else "", if (spec$drift) " with drift" else "")
    ps <- sd(diff(y[known]))
    out$persistence[i] <- y[t - 1]
    out$persistenceSd[i] <- ps
    out$persistencePBelow0[i] <- pnorm(0, y[t - 1], ps)
  }
  out
}

series_json <- function(name, y, targets) {
  r <- run_series(y, targets)
  cat(name, ": orders used ", paste(unique(r$order), collapse = "; "), "\n", sep = "")
  paste0('{"name":"', name, '","observed":', arr(y[targets]),
         ',"mean":', arr(r$mean), ',"sd":', arr(r$sd),
         ',"lower80":', arr(r$lower80), ',"upper80":', arr(r$upper80),
         ',"lower95":', arr(r$lower95), ',"upper95":', arr(r$upper95),
         ',"pBelow0":', arr(r$pBelow0),
         ',"persistence":', arr(r$persistence), ',"persistenceSd":', arr(r$persistenceSd),
         ',"persistencePBelow0":', arr(r$persistencePBelow0),
         ',"order":', strs(r$order), '}')
}

write_year <- function(year) {
  targets <- which(format(dates, "%Y") == year)
  json <- paste0('{"source":"R ', R.version$major, ".", R.version$minor, " (", R.version.string,
                 '), forecast ', as.character(packageVersion("forecast")),
                 ': auto.arima(y, xreg = fourier(ts(y, frequency = 365.25), K = 2), seasonal = FALSE), order re-selected every ',
                 reselect_every, ' origins, Arima re-estimated at every origin on all data so far; persistence with the sd of day-to-day changes so far"',
                 ',"dates":', strs(format(dates[targets])),
                 ',"series":[', series_json("max", sea$temp_max, targets), ",", series_json("min", sea$temp_min, targets), "]}")
  name <- sprintf("seattle-peer-%s.json", year)
  writeLines(json, file.path(out_dir, name))
  cat("wrote", name, "\n")
}

write_year("2014")
write_year("2015")
