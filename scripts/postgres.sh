#!/usr/bin/env bash
# Start a private PostgreSQL server on loopback for the test suite (installed with apt-get when
# absent and running as root). Prints the admin URL on the last line.
set -euo pipefail
PORT=${OSCILLAB_PG_PORT:-5433}
DIR=${OSCILLAB_PG_DIR:-/tmp/oscillab-pg}
BIN=$(ls -d /usr/lib/postgresql/*/bin 2>/dev/null | sort -V | tail -1 || true)
if [ -z "$BIN" ]; then
  if [ "$(id -u)" = "0" ]; then
    (apt-get update -qq || true) && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq postgresql >/dev/null
    BIN=$(ls -d /usr/lib/postgresql/*/bin | sort -V | tail -1)
  else
    echo "PostgreSQL is needed for the PostgreSQL test run: sudo apt-get install -y postgresql" >&2
    exit 1
  fi
fi
as_pg() { if [ "$(id -u)" = "0" ]; then runuser -u postgres -- "$@"; else "$@"; fi; }
if [ "${1:-}" = "stop" ]; then
  [ -d "$DIR/data" ] && as_pg "$BIN/pg_ctl" -D "$DIR/data" -m fast stop >/dev/null
  exit 0
fi
if ! as_pg "$BIN/pg_isready" -q -h 127.0.0.1 -p "$PORT" 2>/dev/null; then
  rm -rf "$DIR" && mkdir -p "$DIR"
  [ "$(id -u)" = "0" ] && chown postgres "$DIR"
  as_pg "$BIN/initdb" -D "$DIR/data" --auth=trust -U postgres >/dev/null
  as_pg "$BIN/pg_ctl" -D "$DIR/data" -l "$DIR/log" -w -o "-p $PORT -k $DIR -c listen_addresses=127.0.0.1 -c fsync=off -c synchronous_commit=off" start >/dev/null
fi
echo "postgres://postgres@127.0.0.1:${PORT}/postgres"
