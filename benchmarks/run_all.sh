#!/usr/bin/env bash
# Run every benchmark in this folder and report which targets failed.
# Each script prints its measurements side by side and exits non-zero when a
# target ratio is missed. Pass --quick to use each script's smaller sizes.
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
echo "all benchmark targets met"
