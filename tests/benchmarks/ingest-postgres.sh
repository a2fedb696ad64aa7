#!/usr/bin/env bash
# PostgreSQL ingest benchmark, one command: a private PostgreSQL server (Debian's binaries, stock
# durability: fsync and synchronous_commit on) in a temporary folder on a loopback port; the
# service (Release build) on it ingests 1,000,000 readings (100 sites x 10,000, one request per
# site, two clients at once, the same `ingest` verb as the SQLite benchmark); then `psql \copy`
# loads the same number of rows from a CSV file into a table keyed like the readings table, in
# the same database. Background refits are switched off (Refit:Enabled=false): 10,000 hourly
# readings make every site due for a fit, which would share the cores with the ingest timed.
# Prints both rates and their ratio (target >= 0.3).
# Usage: tests/benchmarks/ingest-postgres.sh
set -euo pipefail
cd "$(dirname "$0")/../.."

export DOTNET_CLI_TELEMETRY_OPTOUT=1 DOTNET_NOLOGO=1
bin=$(ls -d /usr/lib/postgresql/*/bin 2>/dev/null | sort | tail -1)
[ -x "$bin/pg_ctl" ] || { echo "PostgreSQL is needed (apt-get install postgresql)"; exit 2; }

work=$(mktemp -d)
pid=""
as_pg() { if [ "$(id -u)" = 0 ]; then runuser -u postgres -- "$@"; else "$@"; fi; }
cleanup() {
  [ -n "$pid" ] && kill "$pid" 2>/dev/null || true
  as_pg "$bin/pg_ctl" -D "$work/pg" -m immediate stop >/dev/null 2>&1 || true
  rm -rf "$work"
}
trap cleanup EXIT
[ "$(id -u)" = 0 ] && chown postgres "$work"
chmod 755 "$work"

free_port() { python3 -c 'import socket; s=socket.socket(); s.bind(("127.0.0.1", 0)); print(s.getsockname()[1])'; }
pg_port=$(free_port)
as_pg "$bin/initdb" -D "$work/pg" -A trust -U postgres -E UTF8 >/dev/null
as_pg "$bin/pg_ctl" -D "$work/pg" -w -l "$work/pg.log" -o "-p $pg_port -k $work -c listen_addresses=127.0.0.1" start >/dev/null
psql_db() { psql -h 127.0.0.1 -p "$pg_port" -U postgres -X -q -v ON_ERROR_STOP=1 "$@"; }
psql_db -d postgres -c "CREATE DATABASE forecasthub;"
echo "PostgreSQL: $(psql_db -d postgres -At -c 'SHOW server_version;'), fsync $(psql_db -d postgres -At -c 'SHOW fsync;'), synchronous_commit $(psql_db -d postgres -At -c 'SHOW synchronous_commit;')"

dotnet build -c Release -v q -nologo src/ForecastHub.Api >/dev/null
dotnet build -c Release -v q -nologo tests/ForecastHub.Benchmarks >/dev/null

port=$(free_port)
key="bench-$(date +%s%N)-key-0123456789abcdef"
url="http://127.0.0.1:$port"
dotnet src/ForecastHub.Api/bin/Release/net10.0/ForecastHub.Api.dll --urls "$url" \
  --Storage:Provider=postgres --Storage:ConnectionString="Host=127.0.0.1;Port=$pg_port;Username=postgres;Database=forecasthub" \
  --Auth:AdminKey="$key" --RateLimiting:Enabled=false --Refit:Enabled=false --Serilog:MinimumLevel:Default=Warning >"$work/service.log" 2>&1 &
pid=$!
for _ in $(seq 1 600); do
  curl -sf "$url/health/ready" >/dev/null && break
  sleep 0.1
done

# CPU seconds (user+system) of the PostgreSQL server: the postmaster and every backend it started.
pg_cpu() {
  local main; main=$(head -1 "$work/pg/postmaster.pid")
  for p in "$main" $(pgrep -P "$main"); do cat "/proc/$p/stat" 2>/dev/null; done |
    awk -v hz="$(getconf CLK_TCK)" '{ sub(/^.*\) /, ""); t += $12 + $13 } END { printf "%.1f", t / hz }'
}
pg_cpu_before=$(pg_cpu)
service_out=$(FORECASTHUB_URL="$url" FORECASTHUB_KEY="$key" FORECASTHUB_PID="$pid" \
  dotnet tests/ForecastHub.Benchmarks/bin/Release/net10.0/ForecastHub.Benchmarks.dll ingest)
echo "$service_out" | grep -v '^service_rate='
service_rate=$(echo "$service_out" | sed -n 's/^service_rate=//p')
echo "PostgreSQL server CPU (user+system) during the service run, with site set-up and warm-up: $(awk -v a="$pg_cpu_before" -v b="$(pg_cpu)" 'BEGIN { printf "%.1f", b - a }') s"
kill "$pid"; pid=""

# The same shape of rows as the service stores: 100 sites x 10,000 hourly times from 2022-01-01.
awk 'BEGIN { for (i = 0; i < 1000000; i++) printf "%d,%.0f,%.2f,%.2f,C,0,0\n", int(i / 10000), 1640995200000 + (i % 10000) * 3600000, 10 + (i % 97) * 0.1, 10 + (i % 97) * 0.1 }' >"$work/rows.csv"
psql_db -d forecasthub -c "CREATE TABLE copy_readings (site_key bigint NOT NULL, time_ms bigint NOT NULL, value_c double precision NOT NULL,
  original_value double precision NOT NULL, original_unit text NOT NULL, flags integer NOT NULL DEFAULT 0,
  received_at_ms bigint NOT NULL, PRIMARY KEY (site_key, time_ms));"
start=$(date +%s%N)
psql_db -d forecasthub -c "\\copy copy_readings FROM '$work/rows.csv' WITH (FORMAT csv)"
copy_ms=$(( ($(date +%s%N) - start) / 1000000 ))
copy_rate=$(awk -v ms="$copy_ms" 'BEGIN { printf "%.0f", 1000000 / (ms / 1000) }')
echo "psql \\copy: 1000000 rows into a keyed table in ${copy_ms} ms = ${copy_rate} rows/s"
echo "load average: $(cut -d' ' -f1-3 /proc/loadavg)"
awk -v s="$service_rate" -v e="$copy_rate" 'BEGIN {
  r = s / e; printf "ratio service/copy = %.2f (target >= 0.30): %s\n", r, (r >= 0.3 ? "met" : "MISSED"); exit (r >= 0.3 ? 0 : 1) }'
