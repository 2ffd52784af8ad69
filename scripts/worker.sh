#!/usr/bin/env bash
# Runs one background worker (`npm run worker`; run it again, in another terminal or on another machine
# with the same DATABASE_URL, for more). Arguments go to the worker: `--classes small,large` (the worker
# classes it serves; default both), `--concurrency N` (engine tasks at once per class), `--memory MiB`.
# The worker's entry is scripts/worker.ts (lib/jobs); without it
# there is nothing to run and this says so and exits 0, so start.sh can always call it.
#
# One process per worker: this script replaces itself (exec) with the Node process that runs the jobs,
# TypeScript loaded in-process by tsx's loader (`node --import tsx`, no wrapper process), so the process a
# supervisor starts, signals and watches is the worker itself. SIGTERM or SIGINT: the worker stops taking
# jobs, hands the running ones back to the queue and exits 0.
set -euo pipefail
ROOT="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
if [ ! -f "$ROOT/scripts/worker.ts" ]; then
  echo "[modeshelf] no worker entry yet (scripts/worker.ts); nothing to run"
  exit 0
fi
cd "$ROOT"
exec node --import tsx scripts/worker.ts "$@"
