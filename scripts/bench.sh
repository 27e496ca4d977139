#!/usr/bin/env bash
# npm run bench: every benchmark under tests/bench/, each printing its own table.
# Uses the dev profile's services and app (start them with npm start first).
set -euo pipefail
. "$(dirname "$0")/env.sh"
cd "$ROOT"
bash scripts/services.sh start >/dev/null
port_open "$PORT" || die "the app is not running on $APP_URL; start it with npm start in another terminal"
for b in tests/bench/*.bench.ts; do
  say "benchmark: $b"
  # A benchmark that loads the app's server-only modules in process says so on its first line.
  if head -1 "$b" | grep -q '@bench-conditions react-server'; then npx tsx --conditions=react-server "$b" "$@"; else npx tsx "$b" "$@"; fi
done
