# Sourced by the other scripts. FIELDMARK_PROFILE=dev (default), test or bench picks
# ports and a data folder, so a test run never touches the demo's data.
# Anything already set in the environment (or in .env) wins.
ROOT="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
export ROOT
if [ -f "$ROOT/.env" ]; then set -a; . "$ROOT/.env"; set +a; fi
PROFILE="${FIELDMARK_PROFILE:-dev}"
export FIELDMARK_PROFILE="$PROFILE"
if [ "$PROFILE" = test ]; then
  : "${DB_PORT:=3417}" "${S3_PORT:=4579}" "${SMTP_PORT:=1035}" "${MAIL_WEB_PORT:=1090}" "${PORT:=3100}" "${UPLOAD_MAX_MB:=8}"
  # Tests wait for detection jobs and their retries: look often, retry soon.
  : "${CANDIDATE_POLL_MS:=200}" "${CANDIDATE_RETRY_MS:=300}"
  export UPLOAD_MAX_MB CANDIDATE_POLL_MS CANDIDATE_RETRY_MS
elif [ "$PROFILE" = bench ]; then
  # npm run bench: its own ports and data folder, so benchmarks never touch the demo or a test run.
  : "${DB_PORT:=3427}" "${S3_PORT:=4589}" "${SMTP_PORT:=1045}" "${MAIL_WEB_PORT:=1100}" "${PORT:=3200}"
else
  : "${DB_PORT:=3407}" "${S3_PORT:=4569}" "${SMTP_PORT:=1025}" "${MAIL_WEB_PORT:=1080}" "${PORT:=3000}"
fi
: "${DATA_DIR:=$ROOT/.data/$PROFILE}"
: "${DB_HOST:=127.0.0.1}" "${DB_NAME:=fieldmark}" "${DB_USER:=fieldmark}" "${DB_PASSWORD:=fieldmark-local}"
# The schema's owner (migrations, seeds, grants); the app runs as DB_USER, which may not alter tables.
: "${DB_OWNER_USER:=fieldmark_owner}" "${DB_OWNER_PASSWORD:=fieldmark-owner-local}"
: "${S3_ENDPOINT:=http://127.0.0.1:$S3_PORT}" "${S3_BUCKET:=fieldmark}" "${S3_REGION:=us-east-1}"
: "${S3_ACCESS_KEY_ID:=S3RVER}" "${S3_SECRET_ACCESS_KEY:=S3RVER}"
: "${SMTP_HOST:=127.0.0.1}" "${MAIL_FROM:=Fieldmark <no-reply@fieldmark.local>}"
: "${MAIL_WEB_URL:=http://127.0.0.1:$MAIL_WEB_PORT}"
: "${APP_URL:=http://localhost:$PORT}"
: "${NEXTAUTH_URL:=$APP_URL}"

# The session secret: made once per profile (48 random bytes) and kept in its data folder, which
# git ignores, readable by the owner only; later starts reuse it, `npm test` starts from an empty
# folder and so makes its own. A production start (public APP_URL or FIELDMARK_PRODUCTION=1) gets
# none made here: it must bring its own, and the app refuses to start without one.
app_url_is_local() { [[ "$APP_URL" =~ ^https?://(localhost|127\.0\.0\.1|\[::1\])(:[0-9]+)?(/|$) ]]; }
if [ -z "${NEXTAUTH_SECRET:-}" ] && [ "${FIELDMARK_PRODUCTION:-0}" != 1 ] && app_url_is_local; then
  SECRET_FILE="$DATA_DIR/nextauth-secret"
  if [ ! -s "$SECRET_FILE" ]; then
    mkdir -p "$DATA_DIR"
    tmp="$SECRET_FILE.$$"
    (umask 077; head -c 48 /dev/urandom | base64 -w0 | tr '+/' '-_' | tr -d '=' >"$tmp")
    # ln refuses to replace a file: when two scripts start at once, the first secret stays.
    ln "$tmp" "$SECRET_FILE" 2>/dev/null || true
    rm -f "$tmp"
  fi
  chmod 600 "$SECRET_FILE"
  NEXTAUTH_SECRET="$(cat "$SECRET_FILE")"
fi
export DB_PORT S3_PORT SMTP_PORT MAIL_WEB_PORT PORT DATA_DIR DB_HOST DB_NAME DB_USER DB_PASSWORD \
  DB_OWNER_USER DB_OWNER_PASSWORD S3_ENDPOINT S3_BUCKET S3_REGION S3_ACCESS_KEY_ID S3_SECRET_ACCESS_KEY \
  SMTP_HOST MAIL_FROM MAIL_WEB_URL APP_URL NEXTAUTH_URL
if [ -n "${NEXTAUTH_SECRET:-}" ]; then export NEXTAUTH_SECRET; fi
RUN_DIR="$DATA_DIR/run"
LOG_DIR="$DATA_DIR/log"
export NEXT_TELEMETRY_DISABLED=1

say() { printf '[fieldmark] %s\n' "$*"; }
die() { printf '[fieldmark] error: %s\n' "$*" >&2; exit 1; }
port_open() { (exec 3<>"/dev/tcp/127.0.0.1/$1") 2>/dev/null; }
pid_alive() { [ -f "$1" ] && kill -0 "$(cat "$1")" 2>/dev/null; }
wait_port() { # port seconds
  local i; for ((i = 0; i < $2 * 10; i++)); do port_open "$1" && return 0; sleep 0.1; done; return 1
}
