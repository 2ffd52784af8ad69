#!/usr/bin/env bash
# `npm run dev`: like `npm start`, but `next dev` (hot reload) instead of a production build.
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
if [ -z "${DATABASE_URL:-}" ]; then
  bash scripts/pg.sh start
  export DATABASE_URL="$LOCAL_DATABASE_URL"
fi
node_modules/.bin/tsx scripts/db.ts migrate
node_modules/.bin/tsx scripts/db.ts seed

stop_pidfile "$RUN_DIR/smtp.pid"
stop_pidfile "$RUN_DIR/worker.pid"
trap 'trap - EXIT; stop_pidfile "$RUN_DIR/worker.pid"; stop_pidfile "$RUN_DIR/smtp.pid"' EXIT
trap 'exit 130' INT TERM
setsid node_modules/.bin/tsx scripts/fake-smtp.ts >"$RUN_DIR/smtp.log" 2>&1 &
echo $! >"$RUN_DIR/smtp.pid"
wait_for_port "$SMTP_PORT" 30 || die "the fake SMTP did not start"
# One background worker for the analysis and reduction jobs (log: .run/worker.log).
setsid bash scripts/worker.sh >"$RUN_DIR/worker.log" 2>&1 &
echo $! >"$RUN_DIR/worker.pid"

node_modules/.bin/next dev -H 127.0.0.1 -p "$PORT"
