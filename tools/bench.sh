#!/usr/bin/env bash
# Run the benchmark scripts (tests/benchmarks/bench_*.py, or the ones named) one after another.
# Each prints its own ratios against a baseline measured in the same run.
# Usage: bash tools/bench.sh [tests/benchmarks/bench_NAME.py ...]
set -euo pipefail
source "$(dirname "${BASH_SOURCE[0]}")/venv.sh"
ensure_venv test
cd "$ROOT"

if [ "$#" -eq 0 ]; then
    set -- tests/benchmarks/bench_*.py
fi
status=0
for script in "$@"; do
    echo "== $script"
    "$VENV/bin/python" "$script" || { echo "== $script FAILED"; status=1; }
done
exit "$status"
