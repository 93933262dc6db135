#!/usr/bin/env bash
# Installs what the test suite needs on a fresh machine: the npm packages
# from the lock file, and Debian's Chromium for the browser tests.
set -euo pipefail
cd "$(dirname "$0")/.."

if [ ! -f node_modules/.package-lock.json ] || [ package-lock.json -nt node_modules/.package-lock.json ]; then
  echo "[ensure-env] installing npm packages (npm ci)"
  npm ci --no-audit --no-fund
fi

if [ "${SHEARFIELD_SKIP_BROWSER:-}" != "1" ] && [ ! -x /usr/bin/chromium ]; then
  echo "[ensure-env] installing Debian chromium for the browser tests"
  SUDO=""
  if [ "$(id -u)" != "0" ]; then SUDO="sudo"; fi
  $SUDO apt-get update -qq
  DEBIAN_FRONTEND=noninteractive $SUDO apt-get install -y -qq --no-install-recommends chromium fonts-dejavu-core >/dev/null
fi
