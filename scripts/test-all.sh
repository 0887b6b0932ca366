#!/usr/bin/env bash
# npm test: the unit and integration tests on SQLite and the integration tests on PostgreSQL side by
# side (each runs one file at a time, so together they use both cores of the CI machine: measured,
# 6.6 minutes against 10.8 one after the other), then the browser tests. Each side's output is
# printed whole when it ends; the first failure stops the run with its exit code.
set -uo pipefail
cd "$(dirname "$0")/.."

logs=$(mktemp -d)
trap 'rm -rf "$logs"' EXIT

npx vitest run --project unit --project integration >"$logs/sqlite.log" 2>&1 &
sqlite=$!
bash scripts/pg-cluster.sh run -- npx vitest run --project integration >"$logs/postgres.log" 2>&1 &
postgres=$!
echo "Unit and integration tests on SQLite, and the integration tests on PostgreSQL, side by side…"

status=0
for side in sqlite postgres; do
  pid=${!side}
  wait "$pid"
  code=$?
  echo
  echo "──── ${side}: $([ "$code" = 0 ] && echo passed || echo "FAILED (exit $code)") ────"
  cat "$logs/$side.log"
  [ "$code" = 0 ] || status=$code
done
[ "$status" = 0 ] || exit "$status"

npx vitest run --project e2e
