#!/usr/bin/env bash
# `npm test`: the whole check, from a fresh Debian machine with Node 20.
#   1. installs what is missing: npm packages, Debian's postgresql, chromium, python3-numpy/scipy
#   2. starts PostgreSQL (loopback) and re-creates an empty test database, migrates and seeds it
#   3. starts the fake SMTP on a test port
#   4. vitest: unit, engine and integration tests (integration against the real PostgreSQL)
#   5. tsc --noEmit over the whole tree; the import rules (dependency-cruiser, .dependency-cruiser.cjs) and
#      the unused-code check (knip, knip.jsonc)
#   6. builds the app into .next-test, re-creates and re-seeds the test database (the browser tests meet a
#      fresh shelf), serves the app on a test port with one background worker (the jobs of
#      uploads and reductions), runs the browser tests (playwright-core
#      driving Debian's chromium), screenshots in test-output/
# Stops what it started and exits non-zero if any step failed. Set TEST_DATABASE_URL to use another
# PostgreSQL (its database is migrated, not dropped).
set -uo pipefail
source "$(dirname "${BASH_SOURCE[0]}")/env.sh"
cd "$REPO_ROOT"

TEST_APP_PORT="${TEST_APP_PORT:-3100}"
export SMTP_PORT="${TEST_SMTP_PORT:-2626}"
export NEXT_TELEMETRY_DISABLED=1
export NEXT_DIST_DIR=.next-test
export NEXTAUTH_URL="http://127.0.0.1:$TEST_APP_PORT"
export APP_URL="$NEXTAUTH_URL"
export MODESHELF_TEST_URL="$NEXTAUTH_URL"
# A fresh secret each run: sessions from an earlier run are not valid in this one.
NEXTAUTH_SECRET="$(node -e 'process.stdout.write(require("crypto").randomBytes(32).toString("base64url"))')"
export NEXTAUTH_SECRET
TEST_LOG_DIR="$RUN_DIR/test"
mkdir -p "$TEST_LOG_DIR" "$REPO_ROOT/test-output"

set -e
ensure_node_modules
ensure_native_addon
ensure_python_reference_installed
ensure_chromium_installed
set +e

STARTED_PG=0
cleanup() {
  trap - EXIT INT TERM
  {
    stop_pidfile "$TEST_LOG_DIR/app.pid"
    stop_pidfile "$TEST_LOG_DIR/worker.pid"
    stop_pidfile "$TEST_LOG_DIR/smtp.pid"
    if [ "$STARTED_PG" = 1 ]; then bash scripts/pg.sh stop; fi
  } >>"$TEST_LOG_DIR/cleanup.log" 2>&1
}
trap cleanup EXIT
trap 'exit 130' INT TERM

OWN_DATABASE=0
if [ -n "${TEST_DATABASE_URL:-}" ]; then
  log "using the PostgreSQL in TEST_DATABASE_URL (migrated, not dropped)"
else
  if ! bash scripts/pg.sh status >/dev/null 2>&1; then STARTED_PG=1; fi
  bash scripts/pg.sh start || die "PostgreSQL did not start"
  OWN_DATABASE=1
  export TEST_DATABASE_URL="$LOCAL_TEST_DATABASE_URL"
fi
export DATABASE_URL="$TEST_DATABASE_URL"

# An empty test database (when this script owns it), migrated and seeded with the demo rows: a 200-state
# kiln wall (the start command seeds the thousand-state one; see db/seeds/02_demo_models.ts) and a
# 1600-state hearth plate instead of the 22,500-state one (its analysis is queued,
# db/seeds/03_demo_large_model.ts): the tests upload and reduce their own models.
fresh_test_database() {
  if [ "$OWN_DATABASE" = 1 ]; then
    bash scripts/pg.sh reset-test >/dev/null || die "could not re-create the test database"
  fi
  node_modules/.bin/tsx scripts/db.ts migrate || die "migrating the test database failed"
  MODESHELF_DEMO_WALL=small MODESHELF_DEMO_PLATE=small node_modules/.bin/tsx scripts/db.ts seed || die "seeding the test database failed"
}
fresh_test_database

stop_pidfile "$TEST_LOG_DIR/smtp.pid"
setsid node_modules/.bin/tsx scripts/fake-smtp.ts >"$TEST_LOG_DIR/smtp.log" 2>&1 &
echo $! >"$TEST_LOG_DIR/smtp.pid"
wait_for_port "$SMTP_PORT" 30 || { cat "$TEST_LOG_DIR/smtp.log" >&2; die "the fake SMTP did not start"; }

FAILED=()

log "vitest: unit, engine and integration tests"
node_modules/.bin/vitest run || FAILED+=("vitest (unit, engine, integration)")

log "tsc --noEmit"
node_modules/.bin/tsc --noEmit -p . || FAILED+=("tsc --noEmit")

log "import rules (dependency-cruiser: no cycles, reduction/ alone, lib/ below the UI, no database in pages and routes)"
npm run -s check:deps || FAILED+=("import rules (npm run check:deps)")

log "unused files, exports and dependencies (knip)"
npm run -s check:unused || FAILED+=("unused code (npm run check:unused)")

log "next build (into .next-test; log: .run/test/build.log)"
if node_modules/.bin/next build >"$TEST_LOG_DIR/build.log" 2>&1; then
  # The browser tests meet a freshly seeded shelf, as a new user would (the newcomer test reads the
  # Dashboard's most recent events), not the thousand rows the integration tests left behind.
  if [ "$OWN_DATABASE" = 1 ]; then
    log "a freshly seeded test database for the browser tests"
    fresh_test_database
  fi
  stop_pidfile "$TEST_LOG_DIR/app.pid"
  setsid node_modules/.bin/next start -H 127.0.0.1 -p "$TEST_APP_PORT" >"$TEST_LOG_DIR/app.log" 2>&1 &
  echo $! >"$TEST_LOG_DIR/app.pid"
  if wait_for_http "$MODESHELF_TEST_URL/api/health" 60; then
    stop_pidfile "$TEST_LOG_DIR/worker.pid"
    setsid bash scripts/worker.sh >"$TEST_LOG_DIR/worker.log" 2>&1 &
    echo $! >"$TEST_LOG_DIR/worker.pid"
    log "browser tests against $MODESHELF_TEST_URL (screenshots: test-output/; worker log: .run/test/worker.log)"
    node_modules/.bin/vitest run -c vitest.browser.config.ts || FAILED+=("browser tests")
  else
    tail -30 "$TEST_LOG_DIR/app.log" >&2
    FAILED+=("serving the built app")
  fi
else
  tail -40 "$TEST_LOG_DIR/build.log" >&2
  FAILED+=("next build")
fi

if [ "${#FAILED[@]}" -gt 0 ]; then
  printf '\033[31m[modeshelf] failed: %s\033[0m\n' "$(IFS=', '; echo "${FAILED[*]}")" >&2
  exit 1
fi
