# Shared by scripts/start.sh and scripts/test.sh: pnpm at the pinned version, dependencies installed.
set -euo pipefail
export TURBO_TELEMETRY_DISABLED=1
PNPM_VERSION=12.4.2

ensure_pnpm() {
  if command -v pnpm >/dev/null 2>&1 && [ "$(pnpm --version 2>/dev/null)" = "$PNPM_VERSION" ]; then
    return
  fi
  echo "==> installing pnpm $PNPM_VERSION (npm install -g)"
  if ! npm install -g "pnpm@$PNPM_VERSION" >/dev/null; then
    echo "Could not install pnpm $PNPM_VERSION globally. Run as root, or: npm install -g pnpm@$PNPM_VERSION" >&2
    exit 1
  fi
  hash -r
}

install_dependencies() {
  echo "==> installing dependencies (pnpm install --frozen-lockfile)"
  pnpm install --frozen-lockfile
}
