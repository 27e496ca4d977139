#!/usr/bin/env bash
# npm run dev: the same services and data as npm start, with hot reload.
set -euo pipefail
. "$(dirname "$0")/env.sh"
cd "$ROOT"
bash scripts/install.sh
bash scripts/services.sh start
npx tsx scripts/db.ts migrate
npx tsx scripts/db.ts seed-if-empty
node scripts/print-demo.mjs
HOST=127.0.0.1 exec node server.mjs --dev
