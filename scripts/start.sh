#!/usr/bin/env bash
# `npm start`: everything from a fresh Debian machine with Node 20 to the app on http://localhost:3000.
# Installs what is missing (npm packages, Debian's PostgreSQL), starts PostgreSQL and the fake SMTP on
# loopback, migrates, seeds the demo accounts and models, builds, and serves, with one background worker
# beside the app (`npm run worker` starts more). Ctrl-C stops the app, the fake SMTP and the worker; PostgreSQL keeps running
# (stop it with `bash scripts/pg.sh stop`).
#
# Settings: DATABASE_URL (another PostgreSQL: then no local cluster is started), PORT (3000),
# SMTP_PORT (2525), NEXTAUTH_URL / APP_URL (http://localhost:$PORT), NEXTAUTH_SECRET (generated once).
set -euo pipefail
source "$(dirname "${BASH_SOURCE[0]}")/env.sh"
cd "$REPO_ROOT"

PORT="${PORT:-3000}"
export SMTP_PORT="${SMTP_PORT:-2525}"
export NEXTAUTH_URL="${NEXTAUTH_URL:-http://localhost:$PORT}"
export APP_URL="${APP_URL:-$NEXTAUTH_URL}"
export NEXT_TELEMETRY_DISABLED=1

ensure_node_modules
ensure_native_addon
ensure_auth_secret

if [ -n "${DATABASE_URL:-}" ]; then
  log "using the PostgreSQL in DATABASE_URL; no local cluster is started"
else
  bash scripts/pg.sh start
  export DATABASE_URL="$LOCAL_DATABASE_URL"
fi

log "migrating and seeding the demo accounts and models (the first start analyses and reduces them: about half a minute on two cores)"
node_modules/.bin/tsx scripts/db.ts migrate
node_modules/.bin/tsx scripts/db.ts seed

# A previous `npm start` that was killed hard may have left its helpers running.
stop_pidfile "$RUN_DIR/smtp.pid"
stop_pidfile "$RUN_DIR/worker.pid"

cleanup() {
  trap - EXIT INT TERM
  stop_pidfile "$RUN_DIR/worker.pid"
  stop_pidfile "$RUN_DIR/smtp.pid"
}
trap cleanup EXIT
trap 'exit 130' INT TERM

log "starting the fake SMTP on 127.0.0.1:$SMTP_PORT (mail lands on Admin › Mail)"
setsid node_modules/.bin/tsx scripts/fake-smtp.ts >"$RUN_DIR/smtp.log" 2>&1 &
echo $! >"$RUN_DIR/smtp.pid"
wait_for_port "$SMTP_PORT" 30 || { cat "$RUN_DIR/smtp.log" >&2; die "the fake SMTP did not start"; }

log "building the app (next build)"
node_modules/.bin/next build >"$RUN_DIR/build.log" 2>&1 || { tail -40 "$RUN_DIR/build.log" >&2; die "next build failed (log: .run/build.log)"; }

if [ -f scripts/worker.ts ]; then
  # One worker serves both classes, with a slot for each, so a large job never holds back small ones.
  log "starting one worker for small and large jobs (log: .run/worker.log)"
  setsid bash scripts/worker.sh --classes small,large >"$RUN_DIR/worker.log" 2>&1 &
  echo $! >"$RUN_DIR/worker.pid"
fi

log "Modeshelf is on http://localhost:$PORT  (demo accounts: see README.md; Ctrl-C stops it)"
node_modules/.bin/next start -H 127.0.0.1 -p "$PORT"
