#!/usr/bin/env bash
# `npm run test:soak`: the heavy reliability drills (tests/soak/**) on an instance of their own,
# set up like `npm test` (scripts/test.sh): fault drills with restarts of PostgreSQL, Redis, the
# worker and the stand-ins, and a 60 s load test on loopback. Figures go to .data/soak-<base>/.
# TRISKEL_PORT_BASE picks the ports (default 41500). Extra arguments go to vitest.
#   bash scripts/soak.sh ctl ACTION   (used by the drills: pg-stop, pg-start, redis-stop,
#   redis-start, mail-stop, mail-start; needs the variables the main run exports)
source "$(dirname "$0")/lib.sh"

PG_EXTRA="-c fsync=off -c synchronous_commit=off -c full_page_writes=off"
start_mail_fake() {
  start_bg mail node_modules/.bin/maildev --ip 127.0.0.1 --web-ip 127.0.0.1 -s "$SMTP_PORT" -w "$MAIL_WEB_PORT" --mail-directory "$RUN_DIR/mail" --silent
  wait_http "$MAIL_WEB_URL/email" mail
}

if [ "${1:-}" = ctl ]; then
  [ -n "${PG_DATA:-}" ] && [ -n "${RUN_DIR:-}" ] || die "soak ctl: run it from the soak tests (PG_DATA and RUN_DIR unset)"
  case "${2:-}" in
    pg-stop) stop_postgres ;;
    pg-start) start_postgres "$PG_EXTRA" ;;
    redis-stop) stop_redis ;;
    redis-start) start_redis no ;;
    mail-stop) stop_bg mail ;;
    mail-start) start_mail_fake ;;
    *) die "soak ctl: unknown action ${2:-}" ;;
  esac
  exit 0
fi

ensure_system_packages test
ensure_node_modules
BASE=${TRISKEL_PORT_BASE:-41500}
setup_instance "soak-$BASE" "$BASE"
export NEXT_DIST_DIR=".next-soak-$BASE"
export NODE_ENV=production
export PG_DATA PG_SOCK RUN_DIR
export TRISKEL_SOAK_OUT="$DATA_DIR"

cleanup() {
  trap - EXIT INT TERM
  stop_bg mail 2>/dev/null || true
  stop_services
  stop_redis
  stop_postgres
}
trap cleanup EXIT
trap 'exit 130' INT TERM

stop_redis; stop_postgres
rm -rf "$PG_DATA" "$RUN_DIR"; mkdir -p "$RUN_DIR"
rm -f "$DATA_DIR/faults.json" "$DATA_DIR/load.json"

start_postgres "$PG_EXTRA"
start_redis no
# The stand-ins first: the demo seed opens the demo lab's payment account at the payment service.
start_fakes
migrate_and_seed
build_web
start_service web next start -H 127.0.0.1 -p "$WEB_PORT"
start_service worker node_modules/.bin/tsx worker/main.ts
wait_http "$APP_URL/api/v1/health" web
export TRISKEL_WORKER_PID_FILE="$RUN_DIR/worker.pid"

log "running the soak tests (faults and load; several minutes)"
set +e
TRISKEL_SOAK=1 NODE_ENV=test vitest run --project soak "$@"
rc=$?
set -e
[ $rc -ne 0 ] && log "soak tests failed (exit $rc); service logs are in $RUN_DIR"
for f in faults load; do [ -f "$DATA_DIR/$f.json" ] && log "figures: $DATA_DIR/$f.json"; done
exit $rc
