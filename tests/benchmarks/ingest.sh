#!/usr/bin/env bash
# Ingest benchmark, one command: the service (Release build, its own temporary SQLite file)
# ingests 1,000,000 readings (100 sites x 10,000, one request per site, two clients at once);
# then the sqlite3 command-line engine inserts 1,000,000 rows in one statement into a table
# keyed like the service's readings table, in WAL mode with the same synchronous=FULL.
# Background refits are switched off (Refit:Enabled=false): 10,000 hourly readings make every
# site due for a fit, and fits would share the two cores with the ingest being timed.
# Before the clock starts the client sends the same workload twice into warm-up sites and waits
# until the service is idle, so the timed pass runs compiled code (see IngestVerb).
# Prints both rates and their ratio (target >= 0.3). Usage: tests/benchmarks/ingest.sh
set -euo pipefail
cd "$(dirname "$0")/../.."

export DOTNET_CLI_TELEMETRY_OPTOUT=1 DOTNET_NOLOGO=1
command -v sqlite3 >/dev/null || { echo "sqlite3 is needed (apt-get install sqlite3)"; exit 2; }

work=$(mktemp -d)
pid=""
cleanup() { [ -n "$pid" ] && kill "$pid" 2>/dev/null || true; rm -rf "$work"; }
trap cleanup EXIT

dotnet build -c Release -v q -nologo src/ForecastHub.Api >/dev/null
dotnet build -c Release -v q -nologo tests/ForecastHub.Benchmarks >/dev/null

port=$(python3 -c 'import socket; s=socket.socket(); s.bind(("127.0.0.1", 0)); print(s.getsockname()[1])')
key="bench-$(date +%s%N)-key-0123456789abcdef"
url="http://127.0.0.1:$port"
dotnet src/ForecastHub.Api/bin/Release/net10.0/ForecastHub.Api.dll --urls "$url" \
  --Storage:Path="$work/service.db" --Auth:AdminKey="$key" --RateLimiting:Enabled=false --Refit:Enabled=false \
  --Serilog:MinimumLevel:Default=Warning >"$work/service.log" 2>&1 &
pid=$!
for _ in $(seq 1 600); do
  curl -sf "$url/health/ready" >/dev/null && break
  sleep 0.1
done

cpu_ticks() { awk '{ print $14 + $15 }' "/proc/$pid/stat"; }
ticks_before=$(cpu_ticks)
service_out=$(FORECASTHUB_URL="$url" FORECASTHUB_KEY="$key" FORECASTHUB_PID="$pid" \
  dotnet tests/ForecastHub.Benchmarks/bin/Release/net10.0/ForecastHub.Benchmarks.dll ingest)
echo "$service_out" | grep -v '^service_rate='
service_rate=$(echo "$service_out" | sed -n 's/^service_rate=//p')
ticks=$(( $(cpu_ticks) - ticks_before ))
echo "service CPU (user+system) for the whole run, with site set-up, warm-up and start-up compilation: $(awk -v t="$ticks" -v hz="$(getconf CLK_TCK)" 'BEGIN { printf "%.1f", t / hz }') s"
kill "$pid"; pid=""

engine_ms=$(sqlite3 "$work/engine.db" <<'SQL' | tail -1
PRAGMA journal_mode = WAL;
PRAGMA synchronous = FULL;
CREATE TABLE readings (
    site_key INTEGER NOT NULL, time_ms INTEGER NOT NULL, value_c REAL NOT NULL,
    original_value REAL NOT NULL, original_unit TEXT NOT NULL, flags INTEGER NOT NULL DEFAULT 0,
    received_at_ms INTEGER NOT NULL, PRIMARY KEY (site_key, time_ms)) WITHOUT ROWID;
CREATE TEMP TABLE t0 AS SELECT CAST((julianday('now') - 2440587.5) * 86400000 AS INTEGER) AS ms;
WITH RECURSIVE n(i) AS (SELECT 0 UNION ALL SELECT i + 1 FROM n WHERE i < 999999)
INSERT INTO readings
SELECT i / 10000, 1640995200000 + (i % 10000) * 3600000, 10 + (i % 97) * 0.1, 10 + (i % 97) * 0.1, 'C', 0, 0 FROM n;
SELECT CAST((julianday('now') - 2440587.5) * 86400000 AS INTEGER) - ms FROM t0;
SQL
)
engine_rate=$(awk -v ms="$engine_ms" 'BEGIN { printf "%.0f", 1000000 / (ms / 1000) }')
echo "sqlite3 engine: 1000000 rows in one statement in ${engine_ms} ms = ${engine_rate} rows/s"
awk -v s="$service_rate" -v e="$engine_rate" 'BEGIN {
  r = s / e; printf "ratio service/engine = %.2f (target >= 0.30): %s\n", r, (r >= 0.3 ? "met" : "MISSED"); exit (r >= 0.3 ? 0 : 1) }'
