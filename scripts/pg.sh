#!/usr/bin/env bash
# PostgreSQL for Modeshelf on 127.0.0.1:$MODESHELF_PG_PORT (54329 unless set).
#   bash scripts/pg.sh start    install Debian's postgresql if missing, init the cluster once, start it,
#                               create the modeshelf role and the app and test databases
#   bash scripts/pg.sh stop     stop the cluster (fast shutdown)
#   bash scripts/pg.sh status   say whether it runs, where its data lives and the connection URLs
#   bash scripts/pg.sh reset-test   drop and re-create the test database (empty)
# Idempotent: start twice is fine, and a stale postmaster.pid left by a crash is cleared.
set -euo pipefail
source "$(dirname "${BASH_SOURCE[0]}")/env.sh"

# The server refuses to run as root, so it runs as the postgres system user, which must be able to reach
# the data folder. CI clones into a folder we do not choose (possibly under /root, closed to others); then
# the data lives under /tmp in a folder named after a hash of the checkout path, so each checkout keeps its
# own cluster.
REPO_HASH="$(printf '%s' "$REPO_ROOT" | sha256sum | cut -c1-12)"
SOCKET_DIR="/tmp/modeshelf-pg-$REPO_HASH.sock"   # short: unix socket paths are limited to ~107 bytes

ensure_postgres_user() {
  id postgres >/dev/null 2>&1 || die "the postgres system user is missing (is the postgresql package installed?)"
}

# From / so that tools run as postgres do not complain about a working folder they cannot enter.
as_postgres() { (cd / && runuser -u postgres -- "$@"); }

data_dir() {
  if as_postgres test -x "$REPO_ROOT" 2>/dev/null; then
    echo "$REPO_ROOT/.pgdata"
  else
    echo "/tmp/modeshelf-pgdata-$REPO_HASH"
  fi
}

psql_admin() {
  as_postgres "$BIN/psql" -X -q -v ON_ERROR_STOP=1 -h "$SOCKET_DIR" -p "$MODESHELF_PG_PORT" -d postgres "$@"
}

# A pid file whose process is gone, or now belongs to something else (pids are reused after a reboot or in
# a fresh container), would make the server refuse to start.
clear_stale_pidfile() {
  local pidfile="$DATA/postmaster.pid" pid
  [ -f "$pidfile" ] || return 0
  pid="$(head -1 "$pidfile" 2>/dev/null || true)"
  if [ -n "$pid" ] && [ -r "/proc/$pid/comm" ] && grep -q '^postgres' "/proc/$pid/comm"; then
    return 0
  fi
  log "removing stale $pidfile (pid ${pid:-?} is not a running postgres)"
  rm -f "$pidfile"
}

# The port a running cluster listens on (line 4 of postmaster.pid), which may differ from the one asked for
# if it was started with another MODESHELF_PG_PORT.
running_port() {
  sed -n 4p "$DATA/postmaster.pid" 2>/dev/null
}

is_running() {
  [ -f "$DATA/postmaster.pid" ] || return 1
  local pid
  pid="$(head -1 "$DATA/postmaster.pid" 2>/dev/null || true)"
  [ -n "$pid" ] && [ -r "/proc/$pid/comm" ] && grep -q '^postgres' "/proc/$pid/comm"
}

init_cluster() {
  [ -f "$DATA/PG_VERSION" ] && return 0
  log "initialising a PostgreSQL cluster in $DATA"
  mkdir -p "$DATA"
  chown postgres:postgres "$DATA"
  chmod 700 "$DATA"
  # Local socket: peer authentication for the postgres superuser (administration from these scripts only).
  # TCP on loopback: password (SCRAM) for everyone.
  as_postgres "$BIN/initdb" -D "$DATA" -U postgres -E UTF8 --locale=C.UTF-8 \
    --auth-local=peer --auth-host=scram-sha-256 >"$RUN_DIR/initdb.log" 2>&1 \
    || { cat "$RUN_DIR/initdb.log" >&2; die "initdb failed"; }
}

start() {
  ensure_postgres_installed
  ensure_postgres_user
  BIN="$(pg_bindir)"
  DATA="$(data_dir)"
  init_cluster
  mkdir -p "$SOCKET_DIR"
  chown postgres:postgres "$SOCKET_DIR"
  chmod 700 "$SOCKET_DIR"
  clear_stale_pidfile
  if is_running; then
    local port
    port="$(running_port)"
    if [ -n "$port" ] && [ "$port" != "$MODESHELF_PG_PORT" ]; then
      die "this checkout's PostgreSQL already runs on port $port, not $MODESHELF_PG_PORT; use MODESHELF_PG_PORT=$port, or stop it first (bash scripts/pg.sh stop)"
    fi
    log "PostgreSQL already running ($DATA)"
  else
    if (exec 3<>"/dev/tcp/127.0.0.1/$MODESHELF_PG_PORT") 2>/dev/null; then
      die "port $MODESHELF_PG_PORT is taken by another server (another checkout's cluster?). Stop it, or set MODESHELF_PG_PORT to a free port."
    fi
    log "starting PostgreSQL on 127.0.0.1:$MODESHELF_PG_PORT ($DATA)"
    touch "$RUN_DIR/postgres.log"
    chown postgres:postgres "$RUN_DIR/postgres.log" 2>/dev/null || true
    local logfile="$RUN_DIR/postgres.log"
    as_postgres test -w "$logfile" 2>/dev/null || logfile="/tmp/modeshelf-pg-$REPO_HASH.log"
    as_postgres "$BIN/pg_ctl" -D "$DATA" -l "$logfile" -w -t 60 start -o \
      "-c listen_addresses=127.0.0.1 -p $MODESHELF_PG_PORT -c unix_socket_directories=$SOCKET_DIR -c synchronous_commit=off" \
      >/dev/null || { tail -30 "$logfile" >&2 || true; die "PostgreSQL failed to start"; }
  fi
  ensure_role_and_databases
}

ensure_role_and_databases() {
  psql_admin <<SQL
DO \$\$
BEGIN
  IF NOT EXISTS (SELECT 1 FROM pg_roles WHERE rolname = '$MODESHELF_DB_USER') THEN
    CREATE ROLE $MODESHELF_DB_USER LOGIN PASSWORD '$MODESHELF_DB_PASSWORD' CREATEDB;
  END IF;
END
\$\$;
SQL
  local db
  for db in "$MODESHELF_DB_NAME" "$MODESHELF_TEST_DB_NAME"; do
    if [ -z "$(psql_admin -tAc "SELECT 1 FROM pg_database WHERE datname = '$db'")" ]; then
      log "creating database $db"
      psql_admin -c "CREATE DATABASE $db OWNER $MODESHELF_DB_USER ENCODING 'UTF8' TEMPLATE template0"
    fi
  done
}

reset_test() {
  BIN="$(pg_bindir)" || die "PostgreSQL is not installed; run: bash scripts/pg.sh start"
  DATA="$(data_dir)"
  is_running || die "PostgreSQL is not running; run: bash scripts/pg.sh start"
  psql_admin -c "DROP DATABASE IF EXISTS $MODESHELF_TEST_DB_NAME WITH (FORCE)"
  psql_admin -c "CREATE DATABASE $MODESHELF_TEST_DB_NAME OWNER $MODESHELF_DB_USER ENCODING 'UTF8' TEMPLATE template0"
}

stop() {
  BIN="$(pg_bindir)" || { log "PostgreSQL is not installed; nothing to stop"; return 0; }
  DATA="$(data_dir)"
  clear_stale_pidfile
  if is_running; then
    log "stopping PostgreSQL ($DATA)"
    as_postgres "$BIN/pg_ctl" -D "$DATA" -m fast -w -t 60 stop >/dev/null
  else
    log "PostgreSQL is not running"
  fi
}

status() {
  BIN="$(pg_bindir)" || { echo "PostgreSQL: not installed"; return 3; }
  DATA="$(data_dir)"
  if is_running; then
    local port
    port="$(running_port)"
    if [ -n "$port" ] && [ "$port" != "$MODESHELF_PG_PORT" ]; then
      echo "PostgreSQL: running on 127.0.0.1:$port (not the requested $MODESHELF_PG_PORT), data in $DATA"
      return 3
    fi
    echo "PostgreSQL: running on 127.0.0.1:$MODESHELF_PG_PORT, data in $DATA"
    echo "DATABASE_URL=$LOCAL_DATABASE_URL"
    echo "TEST_DATABASE_URL=$LOCAL_TEST_DATABASE_URL"
  else
    echo "PostgreSQL: stopped (data in $DATA)"
    return 3
  fi
}

case "${1:-}" in
  start) start ;;
  stop) stop ;;
  status) status ;;
  reset-test) reset_test ;;
  *) echo "usage: bash scripts/pg.sh start|stop|status|reset-test" >&2; exit 2 ;;
esac
