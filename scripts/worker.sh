#!/usr/bin/env bash
# Runs one background worker (`npm run worker`). The worker's entry is scripts/worker.ts, which the jobs
# feature provides; until it exists there is nothing to run and this says so and exits 0, so start.sh can
# always call it. Uses DATABASE_URL like the app.
set -euo pipefail
ROOT="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
if [ ! -f "$ROOT/scripts/worker.ts" ]; then
  echo "[modeshelf] no worker entry yet (scripts/worker.ts); nothing to run"
  exit 0
fi
exec "$ROOT/node_modules/.bin/tsx" "$ROOT/scripts/worker.ts" "$@"
