#!/usr/bin/env bash
# Wide exploration, outside CI: the property tests and the mutation
# harness with fresh seeds and larger case counts. CI runs the same tests
# from one fixed seed (scripts/test-all.sh); this looks further.
#
#   bash scripts/explore.sh [RUNS] [SCALE]
#
# RUNS seeds (default 20), each with every case count multiplied by SCALE
# (default 20). Each seed is printed; a failing one stops the run, and
# `STAGEWRIGHT_SEED=<seed> STAGEWRIGHT_CASES=<scale> cargo test --release
# -p stagewright-crosschecks --test properties --test fuzz` replays it.
set -euo pipefail
cd "$(dirname "$0")/.."
runs="${1:-20}"
scale="${2:-20}"
cargo build --release -q -p stagewright-crosschecks --tests
for i in $(seq 1 "$runs"); do
  seed=$(od -An -N8 -tu8 /dev/urandom | tr -d ' ')
  printf 'run %d of %d: STAGEWRIGHT_SEED=%s STAGEWRIGHT_CASES=%s\n' "$i" "$runs" "$seed" "$scale"
  if ! STAGEWRIGHT_SEED="$seed" STAGEWRIGHT_CASES="$scale" \
      cargo test --release -q -p stagewright-crosschecks --test properties --test fuzz >/tmp/explore.$$.log 2>&1; then
    cat /tmp/explore.$$.log
    echo "FAILED with STAGEWRIGHT_SEED=$seed STAGEWRIGHT_CASES=$scale"
    rm -f /tmp/explore.$$.log
    exit 1
  fi
done
rm -f /tmp/explore.$$.log
echo "all $runs runs passed (case counts ×$scale)"
