#!/usr/bin/env bash
# Installs what is missing on a fresh Debian machine: the Debian packages the
# services and browser tests need, then the npm packages from the lock file.
set -euo pipefail
. "$(dirname "$0")/env.sh"
need=()
command -v mariadbd >/dev/null 2>&1 || [ -x /usr/sbin/mariadbd ] || need+=(mariadb-server mariadb-client)
command -v chromium >/dev/null 2>&1 || need+=(chromium)
command -v pdftotext >/dev/null 2>&1 || need+=(poppler-utils)
if [ ${#need[@]} -gt 0 ]; then
  say "installing Debian packages: ${need[*]}"
  [ "$(id -u)" = 0 ] && SUDO= || SUDO=sudo
  $SUDO apt-get update -qq
  DEBIAN_FRONTEND=noninteractive $SUDO apt-get install -y -qq --no-install-recommends "${need[@]}" >/dev/null
fi
cd "$ROOT"
# A stamp of the lock file's hash tells whether node_modules matches it (mtimes lie after a clone).
lock_hash=$(sha256sum package-lock.json | cut -d' ' -f1)
if [ "$(cat node_modules/.fieldmark-lock 2>/dev/null)" != "$lock_hash" ]; then
  say "installing npm packages (npm ci)"
  npm ci --no-audit --no-fund --loglevel=error
  echo "$lock_hash" > node_modules/.fieldmark-lock
fi
