#!/usr/bin/env bash
# `npm run bench`: installs what the comparison needs when it is missing (npm packages; Debian's
# python3-numpy, python3-scipy and python3-tifffile for the reference pipeline in
# ../shared/bench/), then runs the engine benchmark (tests/bench/run-bench.ts) in one process.
set -euo pipefail
cd "$(dirname "$0")/.."
# shellcheck source=scripts/lib/common.sh
source scripts/lib/common.sh

ensure_node_modules
if [ -f ../shared/bench/reference_pipeline.py ] && ! /usr/bin/python3 -c 'import numpy, scipy, tifffile' >/dev/null 2>&1; then
  # A subshell: apt_install stops its shell on failure, and the bench should go on without the column.
  (apt_install python3-numpy python3-scipy python3-tifffile) || say "could not install the reference pipeline's Python packages; the bench prints our figures only"
fi
exec node --expose-gc --import tsx tests/bench/run-bench.ts "$@"
