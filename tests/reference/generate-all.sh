#!/usr/bin/env bash
# Regenerates every R reference fixture under tests/ForecastHub.Core.Tests/Fixtures/.
set -euo pipefail
cd "$(dirname "$0")/../.."
R --version | head -1
for script in tests/reference/*-fixtures.R; do
  echo "== $script"
  Rscript "$script"
done
