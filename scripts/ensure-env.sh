#!/usr/bin/env bash
# Installs what the test suite needs on a fresh machine: the npm packages
# from the lock file, Debian's Chromium for the browser tests and Debian's
# python3-segyio for the SEG-Y reference test.
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

# Debian's python3-segyio: the independent SEG-Y reader/writer of test/reference/segy-segyio.test.ts
# (that test says it is skipped, and why, where this cannot be installed).
if [ "${SHEARFIELD_SKIP_SEGYIO:-}" != "1" ] && ! /usr/bin/python3 -c 'import segyio' >/dev/null 2>&1; then
  echo "[ensure-env] installing Debian python3-segyio for the SEG-Y reference test"
  SUDO=""
  if [ "$(id -u)" != "0" ]; then SUDO="sudo"; fi
  { $SUDO apt-get update -qq && DEBIAN_FRONTEND=noninteractive $SUDO apt-get install -y -qq --no-install-recommends python3-segyio >/dev/null; } ||
    echo "[ensure-env] python3-segyio could not be installed; the segyio reference test will be skipped"
fi
