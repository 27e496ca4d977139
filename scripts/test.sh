#!/usr/bin/env bash
# npm test: the same set-up as npm start, on throw-away data folders and ports
# (profile "test"), then the type check and lint, then unit, integration and browser tests
# against the real services.
set -uo pipefail
export FIELDMARK_PROFILE=test
. "$(dirname "$0")/env.sh"
cd "$ROOT"
t0=$(date +%s)
RESULTS="$DATA_DIR/../test-results"
export NEXT_DIST_DIR=.next-test
app_pid=

cleanup() {
  [ -n "$app_pid" ] && kill -- "-$app_pid" 2>/dev/null
  bash scripts/services.sh stop >/dev/null 2>&1
}
trap cleanup EXIT

bash scripts/install.sh || exit 1
# Fail fast: a type error or a lint finding stops the run before any service starts.
say "type check (tsc) and lint (eslint)"
npx tsc --noEmit || die "the type check failed (npm run typecheck)"
npx eslint --max-warnings 0 . || die "lint found problems (npm run lint)"
bash scripts/services.sh reset >/dev/null
# The reset removed the data folder and the session secret kept there: this run makes its own.
if [ -n "${SECRET_FILE:-}" ]; then unset NEXTAUTH_SECRET; . scripts/env.sh; fi
bash scripts/services.sh start || exit 1
mkdir -p "$RESULTS" "$LOG_DIR"
npx tsx scripts/db.ts migrate || exit 1
npx tsx scripts/db.ts seed || exit 1

say "building the app for the browser and HTTP tests"
if ! npx next build >"$LOG_DIR/build.log" 2>&1; then tail -60 "$LOG_DIR/build.log"; die "build failed"; fi
port_open "$PORT" && die "port $PORT is taken; set PORT for the test run"
# Its own process group, so the cleanup stops the server and every child it started.
HOST=127.0.0.1 setsid node server.mjs >"$LOG_DIR/app.log" 2>&1 &
app_pid=$!
wait_port "$PORT" 60 || { tail -40 "$LOG_DIR/app.log"; die "the app did not start"; }

status=0
say "unit and integration tests (vitest)"
NODE_OPTIONS="--import tsx" npx vitest run --reporter=default --reporter=json --outputFile.json="$RESULTS/vitest.json" || status=1
say "browser tests (Playwright, Debian chromium)"
npx playwright test 2>&1 | tee "$LOG_DIR/playwright.out" || status=1
[ "${PIPESTATUS[0]}" = 0 ] || status=1
node scripts/summarise-tests.mjs "$RESULTS" || status=1
say "test run took $(( $(date +%s) - t0 )) s"
exit $status
