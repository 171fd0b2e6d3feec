#!/usr/bin/env bash
# `npm test`: the same set-up as `npm start` on its own ports with a fresh database and a Redis
# without persistence, a type check, lint and format check of the whole tree, then every test
# (unit, integration, browser), then stop everything.
# TRISKEL_PORT_BASE picks the ports (default 41000), so several test runs can coexist.
# Extra arguments go to vitest (for example `npm test -- --project unit`).
source "$(dirname "$0")/lib.sh"

ensure_system_packages test
ensure_node_modules
BASE=${TRISKEL_PORT_BASE:-41000}
setup_instance "test-$BASE" "$BASE"
export NEXT_DIST_DIR=".next-test-$BASE"
export NODE_ENV=production

cleanup() {
  trap - EXIT INT TERM
  stop_services
  stop_redis
  stop_postgres
}
trap cleanup EXIT
trap 'exit 130' INT TERM

# A fresh instance every time: nothing is shared with a developer's running one.
stop_redis; stop_postgres
rm -rf "$PG_DATA" "$RUN_DIR"; mkdir -p "$RUN_DIR"

start_postgres "-c fsync=off -c synchronous_commit=off -c full_page_writes=off"
start_redis no
# The stand-ins first: the demo seed opens the demo lab's payment account at the payment service.
start_fakes
migrate_and_seed
build_web
# next build checks src/ only; this checks the whole tree (src, worker, scripts, tests, fakes).
log "type-checking the whole tree (tsc --noEmit)"
node_modules/.bin/tsc --noEmit -p tsconfig.json || die "type errors (tsc --noEmit above)"
log "linting (eslint)"
node_modules/.bin/eslint --max-warnings 0 . || die "lint errors (eslint above)"
log "checking the formatting (prettier --check)"
node_modules/.bin/prettier --check --log-level warn . || die "files not formatted (listed above; npm run format fixes them)"
start_service web next start -H 127.0.0.1 -p "$WEB_PORT"
start_service worker node_modules/.bin/tsx worker/main.ts
wait_http "$APP_URL/api/v1/health" web
export TRISKEL_WORKER_PID_FILE="$RUN_DIR/worker.pid"

log "running the tests"
set +e
NODE_ENV=test vitest run "$@"
rc=$?
set -e
[ $rc -ne 0 ] && log "tests failed (exit $rc); service logs are in $RUN_DIR"
exit $rc
