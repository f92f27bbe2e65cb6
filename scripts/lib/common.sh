# shellcheck shell=bash
# Helpers shared by scripts/start.sh and scripts/test.sh: messages, Debian packages, npm packages.
# Sourced, not run. Callers set `set -euo pipefail` and cd to the repository root first.

# Print a message prefixed with the script's name, on stderr so it never mixes with data output.
say() { printf 'orderly: %s\n' "$*" >&2; }

# Stop with a message.
die() { say "error: $*"; exit 1; }

# Run a command as root: directly when we are root, through sudo otherwise.
as_root() {
  if [ "$(id -u)" = 0 ]; then
    "$@"
  elif command -v sudo >/dev/null 2>&1; then
    sudo "$@"
  else
    die "need root to run: $* (no sudo here). Install it by hand, then run this again."
  fi
}

# Install Debian packages without questions. `apt-get update` only when the plain install fails:
# on a machine whose package lists are fresh enough that saves a slow download.
apt_install() {
  command -v apt-get >/dev/null 2>&1 || die "apt-get not found; install these packages by hand: $*"
  say "installing Debian packages: $* (apt-get)"
  if ! as_root env DEBIAN_FRONTEND=noninteractive apt-get install -y -q "$@"; then
    say "install failed; refreshing the package lists (apt-get update) and trying again"
    as_root env DEBIAN_FRONTEND=noninteractive apt-get update -q
    as_root env DEBIAN_FRONTEND=noninteractive apt-get install -y -q "$@"
  fi
}

# `npm ci` when node_modules is missing or older than package-lock.json. npm writes
# node_modules/.package-lock.json on every install, so its age is the age of the installed tree.
ensure_node_modules() {
  if [ ! -f node_modules/.package-lock.json ] || [ package-lock.json -nt node_modules/.package-lock.json ]; then
    say "installing npm packages (npm ci)"
    npm ci --no-audit --no-fund
  fi
}
