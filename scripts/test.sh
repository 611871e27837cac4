#!/usr/bin/env bash
# The whole test suite, from a clean clone: installs what is missing, starts
# the services (and stops again those it started), resets the test database,
# runs lint and type checks, builds the app into .next-test, serves it on
# 127.0.0.1:3100 with a worker, and runs the unit, integration and end-to-end
# layers. Ends with the plain line "N passed, N failed".
#   scripts/test.sh [vitest filters...]
# TEST_LANE=1..14 runs a second suite beside the first (its own database, Redis
# database, queue prefix, port and build folder), for parallel work on one machine.
# TEST_QUICK=1 skips lint and the type check. Skipped and todo tests count as
# failures unless ALLOW_SKIP=1.
. "$(dirname "$0")/lib/common.sh"
. "$(dirname "$0")/lib/app.sh"

bash "$ROOT/scripts/setup.sh"
load_env

services_were_up=false
status="$(bash "$ROOT/scripts/services.sh" status)"
case "$status" in *"redis: running"*) services_were_up=true ;; esac
bash "$ROOT/scripts/services.sh" start

# The test world: its own database, Redis database, queue prefix, buckets, port.
lane="${TEST_LANE:-0}"
case "$lane" in [0-9]|1[0-4]) ;; *) die "TEST_LANE must be a whole number from 0 to 14, not '$lane'" ;; esac
suffix=""; [ "$lane" = 0 ] || suffix="_lane$lane"
export TEST_DATABASE_URL="${TEST_DATABASE_URL}${suffix}"
export DATABASE_URL="$TEST_DATABASE_URL"
export REDIS_DB=$((1 + lane))
export REDIS_URL="redis://127.0.0.1:$REDIS_PORT/$REDIS_DB"
export QUEUE_PREFIX="crownlight-test${suffix}"
export S3_BUCKET_ORIGINALS="crownlight-test-originals" S3_BUCKET_DERIVED="crownlight-test-derived" S3_BUCKET_EXPORTS="crownlight-test-exports"
app_port=$((3100 + lane))
export APP_PORT=$app_port APP_URL="http://127.0.0.1:$app_port" BETTER_AUTH_URL="http://127.0.0.1:$app_port"
dist=".next-test${suffix}"; web="test-web${suffix}"; worker="test-worker${suffix}"
export ARTIFACTS="$ROOT/.artifacts"
mkdir -p "$ARTIFACTS"

passed=0; failed=0
check() {
  local label="$1"; shift
  if "$@" >"$LOGS/$label.log" 2>&1; then
    passed=$((passed + 1)); say "ok: $label"
  else
    failed=$((failed + 1)); say "FAILED: $label"; tail -n 40 "$LOGS/$label.log" >&2
  fi
}

cleanup() {
  stop_named "$web"
  stop_named "$worker"
  if [ "$services_were_up" = false ] && [ "$lane" = 0 ]; then bash "$ROOT/scripts/services.sh" stop; fi
}
trap cleanup EXIT

# A clean database and Redis for every run.
psql_test() { "$(pg_bin)/psql" "$TEST_DATABASE_URL" -v ON_ERROR_STOP=1 -q "$@"; }
if [ "$lane" != 0 ]; then
  "$(pg_bin)/psql" "${TEST_DATABASE_URL%/*}/postgres" -tAc "select 1 from pg_database where datname='${TEST_DATABASE_URL##*/}'" | grep -q 1 \
    || "$(pg_bin)/psql" "${TEST_DATABASE_URL%/*}/postgres" -qc "create database ${TEST_DATABASE_URL##*/}" >/dev/null
fi
psql_test -c "set client_min_messages = warning; drop schema if exists public cascade; drop schema if exists drizzle cascade; create schema public;" >/dev/null
redis-cli -p "$REDIS_PORT" -n "$REDIS_DB" flushdb >/dev/null
(cd "$ROOT" && node --import tsx db/migrate.ts) >/dev/null || die "migrating the test database failed"
(cd "$ROOT" && SEED_DEMO_BRACKETS=0 node --import tsx db/seed/index.ts) >/dev/null || die "seeding the test database failed"

if [ "${TEST_QUICK:-0}" != 1 ]; then
check "lint${suffix}" bash -c "cd '$ROOT' && node node_modules/eslint/bin/eslint.js --max-warnings 0 ."
check "typecheck${suffix}" bash -c "cd '$ROOT' && node node_modules/typescript/bin/tsc --noEmit"
fi

stop_named "$web"
stop_named "$worker"
build_app "$dist"
start_worker "$worker"
start_app "$web" "$app_port" "$dist"

report="$LOGS/vitest${suffix}.json"
rm -f "$report"
vitest_rc=0
(cd "$ROOT" && node node_modules/vitest/vitest.mjs run --reporter=default --reporter=json --outputFile="$report" "$@") || vitest_rc=$?
if [ -f "$report" ]; then
  # A suite that fails before its tests run (import or setup error) counts as
  # one failure, so a broken file can never pass silently.
  read -r vp vf vs vt < <(node -e '
    const r = require(process.argv[1]);
    const broken = (r.testResults || []).filter((s) => s.status === "failed" && !s.assertionResults.some((a) => a.status === "failed")).length;
    console.log(r.numPassedTests, r.numFailedTests + broken, (r.numPendingTests || 0) + (r.numTodoTests || 0), r.numTotalTests);' "$report")
  passed=$((passed + vp)); failed=$((failed + vf))
  # An error outside any test (an unhandled rejection, an "error" event nobody listened to) fails
  # vitest's run but not its JSON report: it counts as one failure here. So does a filter that
  # matched no test file (vitest's other failing status with no failed test).
  if [ "$vitest_rc" -ne 0 ] && [ "$vf" -eq 0 ]; then
    if [ "$vt" -eq 0 ]; then
      say "FAILED: no test ran: no test file matched ${*:-the suite}"
    else
      say "FAILED: vitest ended with status $vitest_rc though every test passed: see \"Unhandled Errors\" above"
    fi
    failed=$((failed + 1))
  fi
  # A skipped or todo test asserts nothing: it fails the run unless ALLOW_SKIP=1 says it is meant.
  if [ "$vs" -gt 0 ]; then
    if [ "${ALLOW_SKIP:-0}" = 1 ]; then
      say "$vs test(s) skipped or todo (allowed by ALLOW_SKIP=1)"
    else
      say "FAILED: $vs test(s) skipped or todo; finish or remove them, or run with ALLOW_SKIP=1"
      failed=$((failed + vs))
    fi
  fi
else
  say "vitest wrote no report"; failed=$((failed + 1))
fi

echo
echo "$passed passed, $failed failed"
[ "$failed" -eq 0 ]
