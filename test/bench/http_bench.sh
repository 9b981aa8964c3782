#!/usr/bin/env bash
# HTTP load benchmark: Debian's wrk on 127.0.0.1 only, each load bounded in time (about
# 1 minute in all). Hono hello-world baseline, cached GETs of a finished run and of charts,
# health-check latency during a 10,000-surrogate run. See test/bench/http_load.ts.
#   bash test/bench/http_bench.sh [--seconds 5] [--connections 32]
set -euo pipefail
cd "$(dirname "$0")/../.."
command -v wrk >/dev/null || { echo "wrk is not installed (apt-get install -y wrk)"; exit 1; }
exec timeout 420 deno run -A test/bench/http_load.ts "$@"
