#!/usr/bin/env bash
# Installs everything and starts Stackproof on its embedded defaults: a SQLite file in ./data,
# a local mail capture, demo data when the database is new. Prints the URL to open.
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
exec pnpm --filter @stackproof/api start
