#!/usr/bin/env bash
# A throwaway PostgreSQL cluster for tests and CI: made in a temporary folder, run by an unprivileged
# user, listening only on 127.0.0.1, and removed when stopped. Nothing here is for production.
#
#   scripts/pg-cluster.sh start DIR PORT   make (if new) and start a cluster in DIR; prints its admin URL
#   scripts/pg-cluster.sh stop DIR         stop it and remove DIR
#   scripts/pg-cluster.sh run -- CMD …     start one on PG_TEST_PORT (55440 by default), run CMD with
#                                          TEST_POSTGRES_ADMIN_URL set, then stop it whatever CMD did
#
# `run` without PostgreSQL's binaries says so and exits 0, unless REQUIRE_POSTGRES=1 (CI), then 1.
set -euo pipefail

# Debian keeps the server binaries out of PATH, in /usr/lib/postgresql/<version>/bin: take the newest.
find_bindir() {
  if command -v initdb >/dev/null 2>&1 && command -v pg_ctl >/dev/null 2>&1; then dirname "$(command -v initdb)"; return 0; fi
  local d
  d=$(ls -d /usr/lib/postgresql/*/bin 2>/dev/null | sort -V | tail -n 1 || true)
  [ -n "$d" ] && [ -x "$d/initdb" ] && [ -x "$d/pg_ctl" ] && { echo "$d"; return 0; }
  return 1
}

# PostgreSQL refuses to run as root: as root, run it as the postgres user (made by Debian's package).
as_owner() {
  if [ "$(id -u)" = 0 ]; then runuser -u "${PG_TEST_USER:-postgres}" -- "$@"; else "$@"; fi
}

start() {
  local dir=$1 port=$2 bindir
  bindir=$(find_bindir) || { echo "pg-cluster: PostgreSQL's server binaries (initdb, pg_ctl) were not found" >&2; return 1; }
  mkdir -p "$dir"
  [ "$(id -u)" = 0 ] && chown "${PG_TEST_USER:-postgres}" "$dir"
  if [ ! -f "$dir/data/PG_VERSION" ]; then
    as_owner "$bindir/initdb" -D "$dir/data" -U postgres --auth=trust --encoding=UTF8 --locale=C.UTF-8 >"$dir/initdb.log" 2>&1 \
      || { cat "$dir/initdb.log" >&2; return 1; }
  fi
  # Speed over durability: the cluster is thrown away after the run, so it never waits for the disk.
  as_owner "$bindir/pg_ctl" -D "$dir/data" -l "$dir/server.log" -w -t 60 \
    -o "-c listen_addresses=127.0.0.1 -c port=$port -c unix_socket_directories=$dir -c fsync=off -c synchronous_commit=off -c full_page_writes=off -c max_connections=200 -c shared_buffers=64MB" \
    start >/dev/null 2>&1 || { cat "$dir/server.log" >&2; return 1; }
  echo "postgres://postgres@127.0.0.1:$port/postgres"
}

stop() {
  local dir=$1 bindir
  bindir=$(find_bindir) || return 0
  [ -f "$dir/data/postmaster.pid" ] && as_owner "$bindir/pg_ctl" -D "$dir/data" -m fast -w stop >/dev/null 2>&1 || true
  rm -rf "$dir"
}

case "${1:-}" in
  start) start "$2" "$3" ;;
  stop) stop "$2" ;;
  run)
    shift
    [ "${1:-}" = "--" ] && shift
    if ! find_bindir >/dev/null; then
      if [ "${REQUIRE_POSTGRES:-0}" = 1 ]; then
        echo "PostgreSQL pass: FAILED, PostgreSQL's server binaries are not installed (REQUIRE_POSTGRES=1)." >&2
        exit 1
      fi
      echo "PostgreSQL pass: SKIPPED, PostgreSQL's server binaries are not installed (apt-get install postgresql to run it)."
      exit 0
    fi
    dir=$(mktemp -d "${TMPDIR:-/tmp}/delta-ledger-pg-XXXXXX")
    chmod 755 "$dir"
    trap 'stop "$dir"' EXIT INT TERM
    url=$(start "$dir" "${PG_TEST_PORT:-55440}")
    echo "PostgreSQL pass: throwaway cluster at $url"
    started=$(date +%s)
    status=0
    TEST_POSTGRES_ADMIN_URL=$url "$@" || status=$?
    echo "PostgreSQL pass: $( [ $status = 0 ] && echo passed || echo FAILED ) in $(( $(date +%s) - started )) s"
    exit $status
    ;;
  *)
    sed -n '2,10p' "$0" >&2
    exit 2
    ;;
esac
