#!/usr/bin/env bash
# Installs everything and runs the whole test suite (unit, API integration, real-browser tests).
# Ends with one line "N passed, N failed" summed over every suite.
set -euo pipefail
cd "$(dirname "$0")/.."
. scripts/lib/common.sh
ensure_pnpm
install_dependencies

CHROMIUM="${CHROMIUM_PATH:-/usr/bin/chromium}"
if [ ! -x "$CHROMIUM" ]; then
  if [ "$(id -u)" = "0" ] && command -v apt-get >/dev/null 2>&1; then
    echo "==> installing Debian's chromium for the browser tests"
    export DEBIAN_FRONTEND=noninteractive
    apt-get update -qq
    apt-get install -y -qq chromium >/dev/null
  else
    echo "Browser tests need Debian's chromium at $CHROMIUM." >&2
    echo "Install it with: sudo apt-get install -y chromium   (or set CHROMIUM_PATH)" >&2
    exit 1
  fi
fi

# The scale-out suite starts its own redis-server on a loopback port (Debian's package; nothing listens by default).
if ! command -v redis-server >/dev/null 2>&1; then
  if [ "$(id -u)" = "0" ] && command -v apt-get >/dev/null 2>&1; then
    echo "==> installing Debian's redis-server for the scale-out tests"
    export DEBIAN_FRONTEND=noninteractive
    apt-get update -qq
    apt-get install -y -qq redis-server >/dev/null
  else
    echo "The scale-out tests need Debian's redis-server. Install it with: sudo apt-get install -y redis-server" >&2
    exit 1
  fi
fi

echo "==> building the web app"
pnpm --filter @stackproof/web build
echo "==> building the server"
pnpm --filter @stackproof/api build
echo "==> running the tests"
exec node scripts/run-tests.mjs
