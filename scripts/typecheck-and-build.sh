#!/usr/bin/env bash
# The type check and the build of npm test, side by side: neither reads what
# the other writes (the type check emits nothing), and on a 2-core machine the
# single-threaded compiler leaves a core for the build. Each one's output is
# printed whole when both have ended; the exit code is non-zero if either failed.
set -uo pipefail
cd "$(dirname "$0")/.."
log=$(mktemp -d)
trap 'rm -rf "$log"' EXIT
npm run -s typecheck >"$log/typecheck" 2>&1 &
tc=$!
npm run -s build >"$log/build" 2>&1 &
bd=$!
wait "$tc"; tc_rc=$?
wait "$bd"; bd_rc=$?
echo "[typecheck-and-build] npm run typecheck (exit $tc_rc)"
cat "$log/typecheck"
echo "[typecheck-and-build] npm run build (exit $bd_rc)"
cat "$log/build"
[ "$tc_rc" -eq 0 ] && [ "$bd_rc" -eq 0 ]
