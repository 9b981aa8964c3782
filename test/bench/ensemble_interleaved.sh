#!/bin/sh
# One interleaved side-by-side run of the 1,000-member daily ensemble: JS in one thread, numpy,
# JS on 2 workers, alternated for several rounds so that a loaded machine treats them alike.
# Take medians and ratios from the lines this prints (each line is one full 1,000-member run).
#   sh test/bench/ensemble_interleaved.sh [rounds]
set -e
cd "$(dirname "$0")/../.."
DENO=${DENO:-deno}
rounds=${1:-3}
i=0
while [ "$i" -lt "$rounds" ]; do
  $DENO run -A test/bench/ensemble_medians.ts 1 thread | tail -1
  /usr/bin/python3 test/bench/ensemble_numpy.py 1 | tail -1
  $DENO run -A test/bench/ensemble_medians.ts 1 workers | tail -1
  i=$((i + 1))
done
