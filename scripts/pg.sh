#!/usr/bin/env bash
# PostgreSQL lifecycle for Tilthmark: a private cluster on 127.0.0.1 per purpose (dev, test).
#   scripts/pg.sh start NAME PORT   create if needed, start, create database "tilthmark"
#   scripts/pg.sh stop NAME PORT    stop cleanly
# Prints nothing but progress to stderr; DATABASE_URL for the cluster is printed by "url".
set -euo pipefail

cmd=${1:?start|stop|url}
name=${2:?cluster name}
port=${3:?port}
root=$(cd "$(dirname "$0")/.." && pwd)
db=tilthmark

log() { echo "[pg:$name] $*" >&2; }

find_bin() {
  for dir in /usr/lib/postgresql/*/bin; do
    if [ -x "$dir/initdb" ]; then echo "$dir"; return 0; fi
  done
  if command -v initdb >/dev/null && command -v pg_ctl >/dev/null; then dirname "$(command -v initdb)"; return 0; fi
  return 1
}

install_postgres() {
  log "PostgreSQL server not found; installing Debian's package (needs root or sudo)"
  local sudo=""
  [ "$(id -u)" -ne 0 ] && sudo="sudo"
  $sudo apt-get update -qq
  DEBIAN_FRONTEND=noninteractive $sudo apt-get install -y -qq postgresql >/dev/null
}

# As root, the cluster belongs to the postgres user (initdb refuses root).
as_owner() {
  if [ "$(id -u)" -eq 0 ]; then runuser -u postgres -- "$@"; else "$@"; fi
}

data_dir() {
  local preferred="$root/.data/pg-$name"
  if [ "$(id -u)" -eq 0 ] && ! runuser -u postgres -- test -x "$root"; then
    # A clone under a private folder is not traversable by postgres: fall back to /tmp.
    echo "/tmp/tilthmark-$(echo "$root" | md5sum | cut -c1-8)/pg-$name"
  else
    echo "$preferred"
  fi
}

socket_dir="/tmp/tm-pg-$port"
# Test clusters are thrown away: skip fsync there for speed; keep it for demo data.
extra=""
case "$name" in test*) extra="-c fsync=off" ;; esac
datadir=$(data_dir)

case "$cmd" in
  url)
    echo "postgres://postgres@127.0.0.1:$port/$db"
    ;;
  start)
    bin=$(find_bin || { install_postgres; find_bin; })
    mkdir -p "$datadir" "$socket_dir"
    if [ "$(id -u)" -eq 0 ]; then chown postgres:postgres "$datadir" "$socket_dir"; chmod 700 "$datadir"; fi
    if [ ! -f "$datadir/PG_VERSION" ]; then
      log "creating cluster in $datadir"
      as_owner "$bin/initdb" -D "$datadir" -U postgres --auth=trust --encoding=UTF8 --locale=C.UTF-8 >/dev/null
    fi
    if as_owner "$bin/pg_ctl" -D "$datadir" status >/dev/null 2>&1; then
      log "already running on port $port"
    else
      if [ -f "$datadir/postmaster.pid" ]; then
        log "removing stale postmaster.pid left by a crash"
        rm -f "$datadir/postmaster.pid"
      fi
      log "starting on 127.0.0.1:$port"
      as_owner "$bin/pg_ctl" -D "$datadir" -l "$datadir/server.log" -w -t 60 start \
        -o "-c listen_addresses=127.0.0.1 -p $port -k $socket_dir -c max_connections=200 $extra" >/dev/null
    fi
    if ! "$bin/psql" -h 127.0.0.1 -p "$port" -U postgres -tAc "select 1 from pg_database where datname='$db'" postgres | grep -q 1; then
      "$bin/createdb" -h 127.0.0.1 -p "$port" -U postgres "$db"
      log "created database $db"
    fi
    ;;
  stop)
    bin=$(find_bin) || exit 0
    if [ -f "$datadir/PG_VERSION" ] && as_owner "$bin/pg_ctl" -D "$datadir" status >/dev/null 2>&1; then
      log "stopping"
      as_owner "$bin/pg_ctl" -D "$datadir" -m fast -w stop >/dev/null
    fi
    ;;
  *)
    echo "usage: $0 start|stop|url NAME PORT" >&2
    exit 2
    ;;
esac
