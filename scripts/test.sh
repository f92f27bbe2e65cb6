#!/usr/bin/env bash
# npm test: everything CI checks, on a fresh clone or a working copy, as root or a normal user.
#
# 1. Installs what is missing: npm packages (npm ci), Debian's postgresql and chromium.
# 2. Starts a throwaway PostgreSQL cluster in .data/test-pg on 127.0.0.1:5489 (fresh each run,
#    never the demo's .data/pg) and exports TEST_PG_URL; tests/support/db-global-setup.ts makes
#    one database per vitest project in it.
# 3. Runs typecheck, lint, unit, api, client build, e2e — all of them, even after a failure.
# 4. Removes the cluster and prints one summary line; exits non-zero when anything failed.
set -euo pipefail
cd "$(dirname "$0")/.."
ROOT=$(pwd -P)
# shellcheck source=lib/common.sh
source scripts/lib/common.sh
# shellcheck source=lib/pg.sh
source scripts/lib/pg.sh

# ORDERLY_TEST_PG_PORT lets two checkouts on one machine test at the same time.
TEST_PG_PORT=${ORDERLY_TEST_PG_PORT:-5489}
TEST_PG_DIR="$ROOT/.data/test-pg"
RESULTS="$ROOT/test-results"
STEPS="$RESULTS/steps.tsv"

now() { date +%s.%N; }
since() { awk -v a="$1" -v b="$(now)" 'BEGIN { printf "%.1f", b - a }'; }
run_started=$(now)

ensure_node_modules
[ -x /usr/bin/chromium ] || apt_install chromium
pg_find_bin

# One test run per checkout at a time: both would want port 5489 and the same folder.
mkdir -p "$ROOT/.data"
exec 8>>"$ROOT/.data/test.lock"
flock -n 8 || die "another 'npm test' is running in $ROOT; wait for it to finish"

cleanup_cluster() {
  pg_stop "$TEST_PG_DIR" immediate
  rm -rf "$TEST_PG_DIR"
}
trap cleanup_cluster EXIT
trap 'exit 130' INT
trap 'exit 143' TERM

# A run killed with -9 leaves its cluster behind: stop and remove it, then start afresh.
cleanup_cluster
cluster_started=$(now)
# No fsync anywhere: the cluster is thrown away at the end, so durability buys nothing.
pg_init "$TEST_PG_DIR" --no-sync
pg_start "$TEST_PG_DIR" "$TEST_PG_PORT" -c fsync=off -c synchronous_commit=off -c full_page_writes=off
say "test PostgreSQL ready on 127.0.0.1:$TEST_PG_PORT in $(since "$cluster_started") s (initdb + start)"
export TEST_PG_URL="postgres://postgres@127.0.0.1:$TEST_PG_PORT/postgres"

mkdir -p "$RESULTS"
rm -f "$STEPS" "$RESULTS"/vitest-*.json
: >"$STEPS"

# run_step NAME KIND REPORT COMMAND... — runs the command, records its exit code; never stops.
run_step() {
  local name=$1 kind=$2 report=$3 started code=0
  shift 3
  started=$(now)
  say "── $name: $*"
  "$@" || code=$?
  say "── $name: exit $code after $(since "$started") s"
  printf '%s\t%s\t%s\t%s\n' "$name" "$kind" "$code" "$report" >>"$STEPS"
}

# run_vitest PROJECT — one vitest project with a JSON report for the counts. A project without
# test files yet passes here (--passWithNoTests) and shows as "no tests" in the summary.
run_vitest() {
  local report="$RESULTS/vitest-$1.json"
  run_step "$1" tests "$report" npx vitest run --project "$1" --passWithNoTests \
    --reporter=default --reporter=json --outputFile.json="$report"
}

run_step typecheck check "" npx tsc --noEmit -p .
run_step lint check "" npx eslint .
run_vitest unit
run_vitest api
run_step build check "" npx vite build --logLevel warn
if [ "$(tail -n 1 "$STEPS" | cut -f 3)" = 0 ]; then
  run_vitest e2e
else
  # The browser tests need the client bundle; without it their failures would say nothing new.
  printf 'e2e\ttests\t-\t\n' >>"$STEPS"
fi

# Remove the cluster before the verdict, so the summary is the last line printed.
trap - EXIT
cleanup_cluster

code=0
node --import tsx scripts/summarize-tests.ts "$STEPS" "$(since "$run_started")" || code=$?
if [ "$code" -gt 1 ]; then
  # The summary script itself broke: fall back to the raw exit codes so the verdict still shows.
  echo "orderly tests: summary failed (exit $code); steps: $(awk -F'\t' '{ printf "%s=%s ", $1, $3 }' "$STEPS")— FAILED"
fi
exit "$code"
