#!/usr/bin/env bash
# Times ForecastHub's whole site-model fit of 87,600 hourly points against R doing lm on the same
# harmonic design + ar.burg(order.max = 48) + Box.test on the same data, in one run; then the whole
# POST .../model/refit of the same points through the service (Release build on loopback), and R once more after it:
# the refit's ratio is to the median of R's fits on both sides of it.
# Usage (from anywhere):  tests/benchmarks/fit-vs-r.sh      Targets: fit CPU <= 0.5 x R; refit request <= 0.5 x R (wall).
set -euo pipefail
cd "$(dirname "$0")/../.."
work=$(mktemp -d)
trap 'rm -rf "$work"' EXIT
export FORECASTHUB_BENCH_CSV="$work/series.csv"

dotnet run -c Release --project tests/ForecastHub.Benchmarks -- fit | tee "$work/ours.txt"
ours=$(grep -o 'fit_ms=[0-9.]*' "$work/ours.txt" | cut -d= -f2)
ours_cpu=$(grep -o 'fit_cpu_ms=[0-9.]*' "$work/ours.txt" | cut -d= -f2)
ours_p10=$(grep -o 'fit_p10_ms=[0-9.]*' "$work/ours.txt" | cut -d= -f2)

cat > "$work/fit.R" <<'RSCRIPT'
x <- read.csv(Sys.getenv("FORECASTHUB_BENCH_CSV"))
# Same design as ForecastHub.Core.Climatology.HarmonicDesign: local standard time of Europe/Berlin (UTC+1).
s <- as.POSIXlt(x$epoch + 3600, origin = "1970-01-01", tz = "UTC")
hour <- s$hour + s$min / 60
doy <- s$yday + hour / 24
X <- cbind(cos(2 * pi * doy / 365.25), sin(2 * pi * doy / 365.25), cos(4 * pi * doy / 365.25), sin(4 * pi * doy / 365.25),
           cos(2 * pi * hour / 24), sin(2 * pi * hour / 24), cos(4 * pi * hour / 24), sin(4 * pi * hour / 24),
           cos(6 * pi * hour / 24), sin(6 * pi * hour / 24))
one <- function() {
  f <- lm(x$value ~ X)
  a <- ar.burg(residuals(f), order.max = 48)
  b <- Box.test(na.omit(a$resid), lag = a$order + 24, type = "Ljung-Box", fitdf = a$order)
  a$order
}
one()
st <- lapply(1:7, function(i) system.time(one()))
wall <- median(sapply(st, function(s) s[["elapsed"]]))
cpu <- median(sapply(st, function(s) s[["user.self"]] + s[["sys.self"]]))
p10 <- quantile(sapply(st, function(s) s[["elapsed"]]), 0.1, names = FALSE)
cat(sprintf("R: %s; AR(%d); median %.1f ms wall, %.1f ms CPU over 7 fits\n", R.version.string, one(), 1000 * wall, 1000 * cpu))
cat(sprintf("RESULT  r_ms=%.1f r_cpu_ms=%.1f r_p10_ms=%.1f\n", 1000 * wall, 1000 * cpu, 1000 * p10))
cat("R_WALL_MS", sprintf("%.1f", 1000 * sapply(st, function(s) s[["elapsed"]])), "\n")
RSCRIPT
Rscript "$work/fit.R" | tee "$work/r.txt"
r=$(grep -o ' r_ms=[0-9.]*' "$work/r.txt" | cut -d= -f2)
r_cpu=$(grep -o 'r_cpu_ms=[0-9.]*' "$work/r.txt" | cut -d= -f2)
ratio=$(awk -v a="$ours" -v b="$r" 'BEGIN { printf "%.3f", a / b }')
r_p10=$(grep -o 'r_p10_ms=[0-9.]*' "$work/r.txt" | cut -d= -f2)
ratio_p10=$(awk -v a="$ours_p10" -v b="$r_p10" 'BEGIN { printf "%.3f", a / b }')
ratio_cpu=$(awk -v a="$ours_cpu" -v b="$r_cpu" 'BEGIN { printf "%.3f", a / b }')
dotnet run -c Release --project tests/ForecastHub.Benchmarks -- refit-http | tee "$work/refit.txt"
# R again right after the refits: this machine's speed drifts over minutes, so the refit is compared with R's fits on
# both sides of it (the median of all 14), not only with the ones a minute before.
Rscript "$work/fit.R" | tee "$work/r2.txt"
r_around=$(cat "$work/r.txt" "$work/r2.txt" | grep '^R_WALL_MS' | cut -d' ' -f2- | tr ' ' '\n' | grep . | sort -n | awk '{ v[NR] = $1 } END { printf "%.1f", (v[int((NR + 1) / 2)] + v[int(NR / 2) + 1]) / 2 }')
r2=$(grep -o ' r_ms=[0-9.]*' "$work/r2.txt" | cut -d= -f2)
refit=$(grep -o 'refit_ms=[0-9.]*' "$work/refit.txt" | cut -d= -f2)
refit_fit=$(grep -o 'refit_fit_ms=[0-9.]*' "$work/refit.txt" | cut -d= -f2)
refit_rebuild=$(grep -o 'refit_rebuild_ms=[0-9.]*' "$work/refit.txt" | cut -d= -f2)
refit_gaussian=$(grep -o 'refit_gaussian_ms=[0-9.]*' "$work/refit.txt" | cut -d= -f2)
ratio_refit=$(awk -v a="$refit" -v b="$r_around" 'BEGIN { printf "%.3f", a / b }')
ratio_refit_rebuild=$(awk -v a="$refit_rebuild" -v b="$r_around" 'BEGIN { printf "%.3f", a / b }')
ratio_refit_gaussian=$(awk -v a="$refit_gaussian" -v b="$r_around" 'BEGIN { printf "%.3f", a / b }')
echo "refit over HTTP after a new reading (calibration table carried): ${refit} ms per request (fitDurationMs ${refit_fit} ms), R ${r_around} ms wall (median of 14 fits: ${r} ms before the refits, ${r2} ms after), ratio ${ratio_refit} (target <= 0.5); rebuilding the table ${refit_rebuild} ms, ratio ${ratio_refit_rebuild}; with Gaussian intervals ${refit_gaussian} ms, ratio ${ratio_refit_gaussian}"
echo "wall: ours ${ours} ms, R ${r} ms, ratio ${ratio}; wall p10: ours ${ours_p10} ms, R ${r_p10} ms, ratio ${ratio_p10}; CPU: ours ${ours_cpu} ms, R ${r_cpu} ms, ratio ${ratio_cpu} (target <= 0.5); load average: $(cut -d' ' -f1-3 /proc/loadavg)"
awk -v q="$ratio_cpu" 'BEGIN { exit (q <= 0.5 ? 0 : 1) }'
