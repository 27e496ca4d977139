#!/usr/bin/env bash
# npm start: install what is missing, start the services, migrate, seed the demo
# scenario when the database is empty, build, and serve on http://localhost:$PORT.
set -euo pipefail
. "$(dirname "$0")/env.sh"
cd "$ROOT"
t0=$(date +%s)
bash scripts/install.sh
# A production start (public APP_URL or FIELDMARK_PRODUCTION=1) with a missing or built-in secret
# or password stops here, before anything starts, naming the variable to set.
NODE_ENV=production npx tsx scripts/check-env.ts
port_open "$PORT" && die "port $PORT is already in use (another Fieldmark or another program). Stop it, or run with PORT=<free port> npm start."
bash scripts/services.sh start
npx tsx scripts/db.ts migrate
npx tsx scripts/db.ts seed-if-empty
if [ "${FIELDMARK_SKIP_BUILD:-0}" != 1 ]; then
  say "building the app (next build)"
  npx next build >"$LOG_DIR/build.log" 2>&1 || { tail -40 "$LOG_DIR/build.log"; die "build failed; full log in $LOG_DIR/build.log"; }
fi
node scripts/print-demo.mjs
say "ready in $(( $(date +%s) - t0 )) s — serving on $APP_URL (Ctrl-C stops the app; 'npm run services:stop' stops the services)"
HOST=127.0.0.1 exec node server.mjs
