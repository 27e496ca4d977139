#!/usr/bin/env bash
# npm run bench [-- --only name,name] [-- --runs N] [-- --keep]: every benchmark under tests/bench/
# on the "bench" profile (its own ports, data folder and build, .next-bench), started here as npm
# test does — services, migrations, the demo seed, a build when the code changed, the app — then one
# table of medians (scripts/bench-run.ts), written to bench-results/<commit>.json.
# npm run bench -- --compare A B: two commits' results side by side (starts nothing).
set -euo pipefail
export FIELDMARK_PROFILE=bench
. "$(dirname "$0")/env.sh"
cd "$ROOT"
if [[ " $* " == *" --compare "* ]]; then exec npx tsx scripts/bench-run.ts "$@"; fi
export NEXT_DIST_DIR=.next-bench
app_pid=
cleanup() {
  [ -n "$app_pid" ] && kill -- "-$app_pid" 2>/dev/null
  bash scripts/services.sh stop >/dev/null 2>&1
}
trap cleanup EXIT
args=()
keep=0
for a in "$@"; do if [ "$a" = --keep ]; then keep=1; else args+=("$a"); fi; done

bash scripts/install.sh
port_open "$PORT" && die "port $PORT is taken; set PORT for the bench run"
# Every run starts from the same freshly seeded demo (comparable across commits); --keep reuses
# the bench profile's data from the last run (quicker; what the benches left behind stays).
if [ "$keep" = 0 ] || [ ! -f "$DATA_DIR/mariadb/.initialised" ]; then
  bash scripts/services.sh reset >/dev/null
  unset NEXTAUTH_SECRET; . scripts/env.sh
fi
bash scripts/services.sh start
mkdir -p "$LOG_DIR"
npx tsx scripts/db.ts migrate
npx tsx scripts/db.ts seed-if-empty
# Build again only when the sources differ from the last bench build's.
src=(app components lib db storage types public proxy.ts instrumentation.ts next.config.mjs postcss.config.mjs tailwind.config.ts tsconfig.json package-lock.json)
stamp="$( { git ls-files -s -- "${src[@]}"; git diff -- "${src[@]}"; git ls-files --others --exclude-standard -- "${src[@]}"; } | sha256sum | cut -c1-16)"
if [ ! -f "$NEXT_DIST_DIR/BUILD_ID" ] || [ "$(cat "$NEXT_DIST_DIR/.bench-stamp" 2>/dev/null)" != "$stamp" ]; then
  say "building the app for the benchmarks (next build into $NEXT_DIST_DIR)"
  if ! npx next build >"$LOG_DIR/build.log" 2>&1; then tail -60 "$LOG_DIR/build.log"; die "build failed"; fi
  echo "$stamp" >"$NEXT_DIST_DIR/.bench-stamp"
fi
HOST=127.0.0.1 setsid node server.mjs >"$LOG_DIR/app.log" 2>&1 &
app_pid=$!
wait_port "$PORT" 60 || { tail -40 "$LOG_DIR/app.log"; die "the app did not start"; }
say "app up on $APP_URL; running the benchmarks"
npx tsx scripts/bench-run.ts "${args[@]}"
