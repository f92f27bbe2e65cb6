# shellcheck shell=bash
# PostgreSQL helpers for a private cluster inside the checkout (the demo's in .data/pg, the
# tests' in .data/test-pg). Sourced after scripts/lib/common.sh.
#
# Facts from /work/shared/STACK.md that shape this file:
# - PostgreSQL refuses to run as root, so as root the cluster belongs to Debian's `postgres` user
#   and every parent folder must be searchable by that user.
# - "Is it running" is answered by pg_isready, not pg_ctl status: after a kill -9 the old
#   postmaster may be reaped late and pg_ctl then believes it still runs, so starts are retried.
# - No unix socket (unix_socket_directories=''): the cluster listens on 127.0.0.1 only, on a port
#   of its own, so checkouts and the test run never meet.

PG_BIN=""

# Find the PostgreSQL server binaries, installing Debian's postgresql package when missing.
pg_find_bin() {
  local dir
  dir=$(ls -d /usr/lib/postgresql/*/bin 2>/dev/null | sort -V | tail -n 1 || true)
  if [ -z "$dir" ] || [ ! -x "$dir/initdb" ]; then
    apt_install postgresql
    dir=$(ls -d /usr/lib/postgresql/*/bin 2>/dev/null | sort -V | tail -n 1 || true)
  fi
  [ -n "$dir" ] && [ -x "$dir/initdb" ] || die "PostgreSQL server binaries not found under /usr/lib/postgresql/*/bin"
  PG_BIN=$dir
}

# The account that owns (or will own) a data folder: the current user, or when we are root the
# folder's owner if it already has a non-root one, else `postgres`.
pg_owner_of() {
  local dir=$1 owner
  if [ "$(id -u)" != 0 ]; then id -un; return; fi
  if [ -e "$dir" ]; then
    owner=$(stat -c %U "$dir")
    if [ "$owner" != root ]; then echo "$owner"; return; fi
  fi
  echo postgres
}

# Run a PostgreSQL server tool as the data folder's owner, from `/` so the tool's working folder
# is always enterable. Absolute paths only.
pg_as_owner() {
  local dir=$1; shift
  if [ "$(id -u)" = 0 ]; then
    (cd / && runuser -u "$(pg_owner_of "$dir")" -- "$@")
  else
    "$@"
  fi
}

# As root: make every parent of $1 searchable by the postgres user (o+x), saying which were changed.
pg_make_reachable() {
  local dir=$1 owner d
  [ "$(id -u)" = 0 ] || return 0
  owner=$(pg_owner_of "$dir")
  d=$(dirname "$dir")
  while :; do
    if ! runuser -u "$owner" -- test -x "$d" 2>/dev/null; then
      chmod o+x "$d"
      say "note: made $d searchable by others (chmod o+x) so the '$owner' user can reach the database folder"
    fi
    [ "$d" = / ] && break
    d=$(dirname "$d")
  done
}

# Create a cluster in $1 (absolute path) unless one is there. Superuser `postgres`, trust auth on
# 127.0.0.1 (the port is bound to loopback only).
# Extra arguments go to initdb (the tests pass --no-sync).
pg_init() {
  local dir=$1; shift
  if [ -f "$dir/PG_VERSION" ]; then
    local have want
    have=$(cat "$dir/PG_VERSION")
    want=$("$PG_BIN/initdb" --version | sed -E 's/.* ([0-9]+)(\.[0-9]+)*.*/\1/')
    [ "$have" = "$want" ] || die "$dir holds a PostgreSQL $have cluster but PostgreSQL $want is installed; move it away (or dump and restore it) and start again"
    return 0
  fi
  if [ -d "$dir" ] && [ -n "$(ls -A "$dir")" ]; then
    die "$dir exists, is not empty and holds no cluster (an interrupted first start?); remove it and start again"
  fi
  mkdir -p "$(dirname "$dir")"
  if [ "$(id -u)" = 0 ]; then
    install -d -m 700 -o postgres -g postgres "$dir"
  else
    install -d -m 700 "$dir"
  fi
  pg_make_reachable "$dir"
  pg_as_owner "$dir" "$PG_BIN/initdb" -D "$dir" -U postgres --auth=trust -E UTF8 --locale=C.UTF-8 "$@" >"$dir.initdb.log" 2>&1 \
    || { cat "$dir.initdb.log" >&2; die "initdb failed for $dir"; }
  rm -f "$dir.initdb.log"
}

# True when a server answers on 127.0.0.1:$1.
pg_ready() { "$PG_BIN/pg_isready" -q -h 127.0.0.1 -p "$1" -t 2; }

# The port a running cluster in $1 wrote into its postmaster.pid (line 4), or nothing.
pg_pid_port() { [ -f "$1/postmaster.pid" ] && sed -n 4p "$1/postmaster.pid" 2>/dev/null || true; }

# Start the cluster in $1 on 127.0.0.1:$2 (no unix socket). Extra arguments are added to the
# server options (the tests pass -c fsync=off ...). Returns once pg_isready answers.
# Callers hold a lock on fd 8 or 9; it is closed for pg_ctl so that the long-lived postmaster
# never inherits it (a stray postmaster would otherwise keep the lock forever).
pg_start() {
  local dir=$1 port=$2; shift 2
  local opts="-c listen_addresses=127.0.0.1 -p $port -c unix_socket_directories='' $*"
  local attempt
  if pg_ready "$port"; then
    [ "$(pg_pid_port "$dir")" = "$port" ] && return 0
    die "another PostgreSQL server already listens on 127.0.0.1:$port (not the one in $dir); stop it or free the port"
  fi
  pg_make_reachable "$dir"
  for attempt in 1 2 3 4 5 6 7 8 9 10; do
    if pg_as_owner "$dir" "$PG_BIN/pg_ctl" -D "$dir" -l "$dir/server.log" -w -t 30 -o "$opts" start >/dev/null 8>&- 9>&-; then
      pg_ready "$port" && return 0
    fi
    pg_ready "$port" && return 0
    # A postmaster killed with -9 may not be reaped yet; its stale postmaster.pid makes the
    # start fail until it is. Waiting a moment and trying again is the cure.
    sleep 1
    say "PostgreSQL in $dir did not start yet (attempt $attempt); trying again"
  done
  tail -n 20 "$dir/server.log" >&2 || true
  die "PostgreSQL in $dir would not start; see $dir/server.log"
}

# Stop the cluster in $1 if it runs. Mode: fast (default) or immediate.
pg_stop() {
  local dir=$1 mode=${2:-fast}
  [ -f "$dir/postmaster.pid" ] || return 0
  pg_as_owner "$dir" "$PG_BIN/pg_ctl" -D "$dir" -m "$mode" -w -t 30 stop >/dev/null 2>&1 || true
}

# Create database $2 on 127.0.0.1:$1 unless it exists.
pg_create_db() {
  local port=$1 name=$2 exists
  exists=$("$PG_BIN/psql" -h 127.0.0.1 -p "$port" -U postgres -d postgres -tAc "SELECT 1 FROM pg_database WHERE datname = '$name'")
  [ "$exists" = 1 ] || "$PG_BIN/createdb" -h 127.0.0.1 -p "$port" -U postgres "$name"
}
