#!/usr/bin/env bash
# Installs everything and starts Stackproof (production mode) for a trial: a SQLite file in ./data, and, asked for
# explicitly because production has neither by default, a local mail capture (MAIL_CAPTURE, unless SMTP_HOST is set)
# and the demo workspace when the database is new (DEMO_DATA). Prints the URL to open.
set -euo pipefail
cd "$(dirname "$0")/.."
. scripts/lib/common.sh
ensure_pnpm
install_dependencies
echo "==> building the web app"
pnpm --filter @stackproof/web build
echo "==> building the server"
pnpm --filter @stackproof/api build
echo "==> starting Stackproof"
export DEMO_DATA="${DEMO_DATA:-true}"
if [ -z "${SMTP_HOST:-}" ]; then export MAIL_CAPTURE="${MAIL_CAPTURE:-true}"; fi
exec pnpm --filter @stackproof/api start
