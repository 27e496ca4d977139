#!/usr/bin/env bash
# start | stop | status | reset — MariaDB, the S3 fake and the mail sink, on
# 127.0.0.1 only, with their data under $DATA_DIR. Starting twice is harmless.
set -euo pipefail
. "$(dirname "$0")/env.sh"
mkdir -p "$RUN_DIR" "$LOG_DIR"
cmd="${1:-status}"

# --- MariaDB -------------------------------------------------------------
DB_DIR="$DATA_DIR/mariadb"
DB_SOCK="$RUN_DIR/mariadb.sock"
DB_PID="$RUN_DIR/mariadb.pid"
DB_TMP="$DATA_DIR/mariadb-tmp"
export DB_SOCKET="$DB_SOCK"

db_ping() { mariadb-admin --no-defaults --socket="$DB_SOCK" -uroot ping >/dev/null 2>&1; }

# Accounts, made again on every start (idempotent), so a data folder from an older checkout is
# brought up to date: the owner (migrations, seeds, grants) may do anything in the app's
# databases; the app account gets its table grants from `scripts/db.ts migrate` and nothing
# database-wide, so it cannot alter or drop tables, nor change the audit log.
db_accounts() {
  local u
  mariadb --no-defaults --socket="$DB_SOCK" -uroot <<SQL
CREATE DATABASE IF NOT EXISTS \`$DB_NAME\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci;
SQL
  for u in "'$DB_OWNER_USER'@'127.0.0.1'" "'$DB_OWNER_USER'@'localhost'"; do
    mariadb --no-defaults --socket="$DB_SOCK" -uroot <<SQL
CREATE USER IF NOT EXISTS $u IDENTIFIED BY '$DB_OWNER_PASSWORD';
ALTER USER $u IDENTIFIED BY '$DB_OWNER_PASSWORD';
GRANT ALL PRIVILEGES ON \`$DB_NAME\`.* TO $u WITH GRANT OPTION;
GRANT ALL PRIVILEGES ON \`${DB_NAME}\\_%\`.* TO $u WITH GRANT OPTION;
SQL
  done
  for u in "'$DB_USER'@'127.0.0.1'" "'$DB_USER'@'localhost'"; do
    mariadb --no-defaults --socket="$DB_SOCK" -uroot <<SQL
CREATE USER IF NOT EXISTS $u IDENTIFIED BY '$DB_PASSWORD';
ALTER USER $u IDENTIFIED BY '$DB_PASSWORD';
SQL
  done
  # Earlier checkouts gave the app account ALL PRIVILEGES on its databases: take them back.
  local host dbname
  while IFS=$'\t' read -r host dbname; do
    [ -n "$host" ] || continue
    mariadb --no-defaults --socket="$DB_SOCK" -uroot -e "REVOKE ALL PRIVILEGES ON \`$dbname\`.* FROM '$DB_USER'@'$host'"
  done < <(mariadb --no-defaults --socket="$DB_SOCK" -uroot -N -B -e "SELECT Host, Db FROM mysql.db WHERE User = '$DB_USER'")
  mariadb --no-defaults --socket="$DB_SOCK" -uroot -e 'FLUSH PRIVILEGES'
}

db_start() {
  if pid_alive "$DB_PID" && db_ping; then say "MariaDB already up on 127.0.0.1:$DB_PORT"; db_accounts; return; fi
  rm -f "$DB_PID" "$DB_SOCK"
  port_open "$DB_PORT" && die "port $DB_PORT is taken by another program; set DB_PORT to a free port (see .env.example)"
  if [ ! -f "$DB_DIR/.initialised" ]; then
    # A folder left half-made by an interrupted first start is made again.
    rm -rf "$DB_DIR"; mkdir -p "$DB_DIR"
    say "initialising MariaDB data folder $DB_DIR"
    mariadb-install-db --no-defaults --datadir="$DB_DIR" --user=root \
      --auth-root-authentication-method=socket --skip-test-db --skip-name-resolve \
      --innodb-log-file-size=16M >"$LOG_DIR/mariadb-install.log" 2>&1 \
      || die "mariadb-install-db failed; see $LOG_DIR/mariadb-install.log"
    touch "$DB_DIR/.initialised"
  fi
  # Temporary tables on disk go in the profile's own folder, not the machine's shared /tmp (where
  # another program's clean-up once removed one mid-query).
  mkdir -p "$DB_TMP"
  setsid mariadbd --no-defaults --datadir="$DB_DIR" --user=root --bind-address=127.0.0.1 \
    --port="$DB_PORT" --socket="$DB_SOCK" --pid-file="$DB_PID" --log-error="$LOG_DIR/mariadb.log" \
    --skip-name-resolve --open-files-limit=4096 --character-set-server=utf8mb4 \
    --collation-server=utf8mb4_unicode_ci --innodb-log-file-size=16M --max-connections=300 --tmpdir="$DB_TMP" \
    </dev/null >/dev/null 2>&1 &
  local i; for ((i = 0; i < 300; i++)); do db_ping && break; sleep 0.1; done
  db_ping || die "MariaDB did not start; see $LOG_DIR/mariadb.log"
  db_accounts
  say "MariaDB up on 127.0.0.1:$DB_PORT (data $DB_DIR)"
}

db_stop() {
  if db_ping; then
    mariadb-admin --no-defaults --socket="$DB_SOCK" -uroot shutdown >/dev/null 2>&1 || true
    local i; for ((i = 0; i < 100; i++)); do pid_alive "$DB_PID" || break; sleep 0.1; done
  fi
  rm -f "$DB_PID"; say "MariaDB stopped"
}

# --- node services (S3 fake, mail sink) ------------------------------------
node_start() { # name port pidfile command...
  local name=$1 port=$2 pidf=$3; shift 3
  if pid_alive "$pidf" && port_open "$port"; then say "$name already up on 127.0.0.1:$port"; return; fi
  rm -f "$pidf"
  port_open "$port" && die "port $port is taken by another program; $name cannot start (set its port in .env, see .env.example)"
  setsid "$@" </dev/null >>"$LOG_DIR/$name.log" 2>&1 &
  echo $! >"$pidf"
  wait_port "$port" 30 || die "$name did not start; see $LOG_DIR/$name.log"
  say "$name up on 127.0.0.1:$port"
}
node_stop() { # name pidfile
  if pid_alive "$2"; then kill "$(cat "$2")" 2>/dev/null || true
    local i; for ((i = 0; i < 50; i++)); do pid_alive "$2" || break; sleep 0.1; done
    pid_alive "$2" && kill -9 "$(cat "$2")" 2>/dev/null || true
  fi
  rm -f "$2"; say "$1 stopped"
}

s3_start() {
  mkdir -p "$DATA_DIR/s3"
  # s3rver's listings need the legacy OpenSSL provider on Node 17+; it runs as its own process.
  NODE_OPTIONS=--openssl-legacy-provider S3_DIR="$DATA_DIR/s3" \
    node_start s3-fake "$S3_PORT" "$RUN_DIR/s3.pid" node "$ROOT/storage/s3rver.mjs"
}
mail_start() {
  mkdir -p "$DATA_DIR/mail"
  node_start mail-sink "$MAIL_WEB_PORT" "$RUN_DIR/mail.pid" "$ROOT/node_modules/.bin/maildev" \
    --ip 127.0.0.1 --web-ip 127.0.0.1 -s "$SMTP_PORT" -w "$MAIL_WEB_PORT" \
    --mail-directory "$DATA_DIR/mail" --hide-extensions STARTTLS
  wait_port "$SMTP_PORT" 10 || die "mail sink SMTP port $SMTP_PORT did not open"
}

status_line() { if eval "$2"; then say "$1: up"; else say "$1: down"; fi; }

# `start db`, `stop s3` …: one service alone (the fault tests stop one and start it again).
svc="${2:-all}"
case "$svc" in all | db | s3 | mail) ;; *) die "usage: services.sh start|stop [db|s3|mail]" ;; esac
want() { [ "$svc" = all ] || [ "$svc" = "$1" ]; }
case "$cmd" in
  start) want db && db_start; want s3 && s3_start; want mail && mail_start; true ;;
  stop) want mail && node_stop mail-sink "$RUN_DIR/mail.pid"; want s3 && node_stop s3-fake "$RUN_DIR/s3.pid"; want db && db_stop; true ;;
  status)
    status_line "MariaDB 127.0.0.1:$DB_PORT" db_ping
    status_line "S3 fake 127.0.0.1:$S3_PORT" "port_open $S3_PORT"
    status_line "mail sink 127.0.0.1:$SMTP_PORT (web $MAIL_WEB_PORT)" "port_open $MAIL_WEB_PORT" ;;
  reset) "$0" stop; rm -rf "$DATA_DIR"; say "removed $DATA_DIR" ;;
  *) die "usage: services.sh start|stop|status|reset" ;;
esac
