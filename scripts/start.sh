#!/usr/bin/env bash
# npm start: the demo on a fresh Debian 12 machine with Node 20, as root or a normal user.
#
# Installs what is missing (npm packages, Debian's postgresql), keeps a PostgreSQL cluster in
# .data/pg on 127.0.0.1:5479 (no unix socket), creates database `orderly`, builds the client
# when src/ changed, seeds the demo data (idempotent; it prints the demo sign-ins) and runs the
# server, which prints its URL. Data lives in .data/ and survives restarts.
#
# Lifetime choice: PostgreSQL is stopped when the app exits, so Ctrl-C leaves nothing running.
# That rules out `exec node` (no shell is left to stop the cluster), so the server runs as a
# child: INT/TERM/HUP are forwarded to it as SIGTERM, the script waits for it to finish, then
# stops PostgreSQL and exits with the server's status. A cluster left running by a killed run
# is simply reused by the next start.
#
# One copy per checkout: .data/start.lock is held (flock, fd 9) from the first step to the last,
# by this script and the server it starts; a second `npm start` says so and exits 1 before it
# touches anything. The postmaster never inherits the lock (see pg_start).
set -euo pipefail
cd "$(dirname "$0")/.."
ROOT=$(pwd -P)
# shellcheck source=lib/common.sh
source scripts/lib/common.sh
# shellcheck source=lib/pg.sh
source scripts/lib/pg.sh

PG_PORT=5479
PG_DIR="$ROOT/.data/pg"
DB_NAME=orderly

mkdir -p "$ROOT/.data"
exec 9>>"$ROOT/.data/start.lock" || die "cannot open $ROOT/.data/start.lock (was .data created by another user?)"
if ! flock -n 9; then
  die "Orderly is already running from $ROOT (it holds .data/start.lock). Stop that one first (Ctrl-C in its terminal); this start changed nothing."
fi

ensure_node_modules
pg_find_bin

# From here on a failure or Ctrl-C stops the cluster again.
trap 'pg_stop "$PG_DIR"' EXIT
trap 'exit 130' INT
trap 'exit 143' TERM
trap 'exit 129' HUP

if [ ! -f "$PG_DIR/PG_VERSION" ]; then say "creating the PostgreSQL cluster in .data/pg (first start)"; fi
pg_init "$PG_DIR"
pg_start "$PG_DIR" "$PG_PORT"
pg_create_db "$PG_PORT" "$DB_NAME"
export DATABASE_URL="${DATABASE_URL:-postgres://postgres@127.0.0.1:$PG_PORT/$DB_NAME}"
# Uploaded frame files (content-addressed, ab/cd/<sha256>) live beside the database in .data/.
export FRAME_STORAGE_DIR="${FRAME_STORAGE_DIR:-$ROOT/.data/frames}"
mkdir -p "$FRAME_STORAGE_DIR"

# The client bundle is rebuilt when missing or older than anything it is built from.
client_stale() {
  [ -f dist/client/index.html ] || return 0
  [ -n "$(find src shared index.html public vite.config.ts package-lock.json -newer dist/client/index.html -print -quit 2>/dev/null || true)" ]
}
if client_stale; then
  say "building the client (vite build)"
  npx vite build --logLevel warn || die "the client build failed (npx vite build); see the messages above"
fi

# The seed migrates the database first, then adds the demo data if it is not there yet.
node --import tsx server/scripts/seed.ts || die "seeding the demo data failed (server/scripts/seed.ts)"

node --import tsx server/index.ts &
app_pid=$!
forward() { kill -TERM "$app_pid" 2>/dev/null || true; }
trap forward INT TERM HUP
# npm does not pass a SIGTERM sent to it alone on to this script (its `sh -c` dies and leaves us
# orphaned), so also watch the parent: once it is gone, stop the server as if signalled.
# `sleep & wait` keeps the traps prompt (bash runs them when `wait` is interrupted).
orphaned=no
while kill -0 "$app_pid" 2>/dev/null; do
  if [ "$orphaned" = no ] && ! kill -0 "$PPID" 2>/dev/null; then
    orphaned=yes
    say "the npm process that started this is gone; stopping the server"
    forward
  fi
  sleep 1 &
  wait $! 2>/dev/null || true
done
status=0
wait "$app_pid" || status=$?
say "server stopped (exit $status); stopping PostgreSQL — data stays in .data/pg"
exit "$status"
