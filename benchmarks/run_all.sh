#!/usr/bin/env bash
# Run every benchmark in this folder and report which targets were missed.
# Each script prints its measurements side by side, one VERDICT line per
# target (met, MISSED, or beyond a measured floor: reported, not failed; see
# benchmarks/_timing.py), and exits non-zero only when a target it can meet
# is missed. Pass --quick to use each script's smaller sizes.
set -u
cd "$(dirname "$0")/.."
python=${PYTHON:-.venv/bin/python}
failed=()
for script in benchmarks/bench_*.py; do
    echo "=== $script"
    if ! "$python" "$script" "$@"; then
        failed+=("$script")
    fi
    echo
done
if [ ${#failed[@]} -gt 0 ]; then
    echo "targets missed in: ${failed[*]}"
    exit 1
fi
echo "no reachable target missed"
