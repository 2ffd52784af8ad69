#!/usr/bin/env bash
# Runs one background worker (`npm run worker`; run it again, in another terminal or on another machine
# with the same DATABASE_URL, for more). The worker's entry is scripts/worker.ts (lib/jobs); without it
# there is nothing to run and this says so and exits 0, so start.sh can always call it.
set -euo pipefail
ROOT="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
if [ ! -f "$ROOT/scripts/worker.ts" ]; then
  echo "[modeshelf] no worker entry yet (scripts/worker.ts); nothing to run"
  exit 0
fi
exec "$ROOT/node_modules/.bin/tsx" "$ROOT/scripts/worker.ts" "$@"
