#!/usr/bin/env bash
# A throwaway PostgreSQL server for the tests: a cluster in a temporary
# folder, listening only on a Unix socket inside it, trust authentication,
# removed when the command ends.
#
#   bash scripts/pgtest.sh run -- CMD ARGS...   start, run CMD with
#                                              BALEASSAY_PG_DSN set, stop
#   bash scripts/pgtest.sh start DIR            start and leave running;
#                                              prints the DSN
#   bash scripts/pgtest.sh stop DIR             stop and remove DIR
#
# When BALEASSAY_PG_DSN is already set, 'run' uses that server instead.
# PostgreSQL refuses to run as root: as root the server runs as the
# 'postgres' user of Debian's package (runuser); otherwise as you.
set -euo pipefail

die() { echo "pgtest: $*" >&2; exit 1; }

bindir() {
  local d
  for d in $(ls -d /usr/lib/postgresql/*/bin 2>/dev/null | sort -V -r); do
    [ -x "$d/postgres" ] && [ -x "$d/initdb" ] && [ -x "$d/pg_ctl" ] && { echo "$d"; return; }
  done
  die "no PostgreSQL server found under /usr/lib/postgresql: apt-get install postgresql postgresql-15-postgis-3 (or run 'make deps')"
}

as_owner() {
  if [ "$(id -u)" -eq 0 ]; then
    id postgres >/dev/null 2>&1 || die "running as root needs the 'postgres' user of Debian's postgresql package"
    runuser -u postgres -- "$@"
  else
    "$@"
  fi
}

start() {
  local dir=$1 bin
  bin=$(bindir)
  mkdir -p "$dir"
  chmod 755 "$dir"
  mkdir -m 700 "$dir/data"
  mkdir -m 755 "$dir/sock"
  if [ "$(id -u)" -eq 0 ]; then chown postgres: "$dir/data" "$dir/sock"; fi
  as_owner "$bin/initdb" -D "$dir/data" -U postgres --auth=trust -E UTF8 --no-locale --no-sync >"$dir/initdb.log" 2>&1 \
    || { cat "$dir/initdb.log" >&2; die "initdb failed"; }
  touch "$dir/server.log"
  if [ "$(id -u)" -eq 0 ]; then chown postgres: "$dir/server.log"; fi
  as_owner "$bin/pg_ctl" -D "$dir/data" -l "$dir/server.log" -w -t 60 \
    -o "-c listen_addresses='' -k $dir/sock -c max_connections=50" start >/dev/null \
    || { cat "$dir/server.log" >&2; die "the server did not start"; }
  echo "host=$dir/sock user=postgres dbname=postgres"
}

stop() {
  local dir=$1 bin
  bin=$(bindir)
  if [ -f "$dir/data/postmaster.pid" ]; then
    as_owner "$bin/pg_ctl" -D "$dir/data" -m fast -w stop >/dev/null 2>&1 || true
  fi
  rm -rf "$dir"
}

case "${1:-}" in
  run)
    shift
    [ "${1:-}" = "--" ] && shift
    [ $# -gt 0 ] || die "usage: pgtest.sh run -- CMD ARGS..."
    if [ -n "${BALEASSAY_PG_DSN:-}" ]; then exec "$@"; fi
    dir=$(mktemp -d /tmp/baleassay-pg.XXXXXX)
    trap 'stop "$dir"' EXIT
    BALEASSAY_PG_DSN=$(start "$dir")
    export BALEASSAY_PG_DSN
    echo "pgtest: PostgreSQL on $dir/sock" >&2
    "$@"
    ;;
  start) [ $# -eq 2 ] || die "usage: pgtest.sh start DIR"; start "$2" ;;
  stop) [ $# -eq 2 ] || die "usage: pgtest.sh stop DIR"; stop "$2" ;;
  *) die "usage: pgtest.sh run -- CMD ARGS... | start DIR | stop DIR" ;;
esac
