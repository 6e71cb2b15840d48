#!/usr/bin/env bash
# scripts/pg.sh start|stop|status — a project-local PostgreSQL cluster, TCP on 127.0.0.1 only.
#   PG_DIR  cluster folder (default .data/pg)      PGPORT  port (default 55432)
# Prints the connection URL on start. Installs Debian's postgresql package when it is missing and we are root.
set -euo pipefail
ROOT="$(cd "$(dirname "$0")/.." && pwd)"
DIR="${PG_DIR:-$ROOT/.data/pg}"
PORT="${PGPORT:-55432}"

find_bin() { ls -d /usr/lib/postgresql/*/bin 2>/dev/null | sort -V | tail -1; }
BIN="$(find_bin)"
if [ ! -x "${BIN:-/nonexistent}/initdb" ]; then
  if [ "$(id -u)" = 0 ] && command -v apt-get >/dev/null; then
    echo "PostgreSQL server not found: installing Debian's postgresql package..." >&2
    apt-get update -q >/dev/null
    DEBIAN_FRONTEND=noninteractive apt-get install -y -q postgresql >/dev/null
    BIN="$(find_bin)"
  fi
  [ -x "${BIN:-/nonexistent}/initdb" ] || { echo "PostgreSQL server not found: run 'sudo apt-get install -y postgresql' and start again." >&2; exit 1; }
fi

mkdir -p "$DIR"
if [ "$(id -u)" = 0 ]; then                       # PostgreSQL refuses to run as root: use the postgres user
  id postgres >/dev/null 2>&1 || useradd --system --home-dir /var/lib/postgresql --shell /bin/false postgres
  as() { runuser -u postgres -- "$@"; }
  if ! as test -x "$DIR"; then                     # a parent folder is closed to the postgres user
    DIR="/tmp/barhound-pg-$(printf %s "$DIR" | md5sum | cut -c1-12)"; mkdir -p "$DIR"
  fi
  chown postgres: "$DIR"
else
  as() { "$@"; }
fi
chmod 700 "$DIR"
D="$DIR/data"
port() { sed -n 4p "$D/postmaster.pid" 2>/dev/null; }
ready() { "$BIN/pg_isready" -q -U app -d postgres -h 127.0.0.1 -p "$1"; }

case "${1:-}" in
start)
  if [ ! -f "$D/PG_VERSION" ]; then
    as "$BIN/initdb" -D "$D" -U app --auth=trust -E UTF8 --locale=C.UTF-8 >"$DIR/initdb.log" 2>&1 \
      || { tail -20 "$DIR/initdb.log" >&2; exit 1; }
  fi
  if ! as "$BIN/pg_ctl" -D "$D" status >/dev/null 2>&1; then
    as "$BIN/pg_ctl" -D "$D" -l "$DIR/server.log" -w -t 60 \
      -o "-c listen_addresses=127.0.0.1 -p $PORT -c unix_socket_directories='' -c fsync=off -c max_connections=200" start >/dev/null \
      || { tail -20 "$DIR/server.log" >&2; exit 1; }
  fi
  p="$(port)"; p="${p:-$PORT}"
  for _ in $(seq 60); do ready "$p" && break; sleep 0.25; done
  ready "$p" || { echo "PostgreSQL did not accept connections on 127.0.0.1:$p" >&2; tail -20 "$DIR/server.log" >&2; exit 1; }
  echo "postgres://app@127.0.0.1:$p/postgres" ;;
stop)
  if as "$BIN/pg_ctl" -D "$D" status >/dev/null 2>&1; then as "$BIN/pg_ctl" -D "$D" -m fast -w stop >/dev/null; fi
  echo stopped ;;
destroy)
  if as "$BIN/pg_ctl" -D "$D" status >/dev/null 2>&1; then as "$BIN/pg_ctl" -D "$D" -m immediate -w stop >/dev/null; fi
  rm -rf "$DIR"; echo destroyed ;;
status)
  if as "$BIN/pg_ctl" -D "$D" status >/dev/null 2>&1; then echo "running :$(port)"; else echo stopped; exit 3; fi ;;
*) echo "usage: $0 start|stop|destroy|status" >&2; exit 2 ;;
esac
