#!/usr/bin/env bash
# `npm run test:soak`: the heavy reliability drills (tests/soak/**) on an instance of their own,
# set up like `npm test` (scripts/test.sh): fault drills with restarts of PostgreSQL, Redis, the
# worker and the stand-ins, and a 60 s load test on loopback. Figures go to .data/soak-<base>/.
# TRISKEL_PORT_BASE picks the ports (default 41500). Extra arguments go to vitest.
#   bash scripts/soak.sh ctl ACTION   (used by the drills; needs the variables the main run exports):
#   pg-stop, pg-start, pg-kill (stop -m immediate: no checkpoint, crash recovery at the next start),
#   redis-stop, redis-start, redis-kill (SIGKILL), web-kill (SIGKILL of the Next process group),
#   web-start (next start again, as below), mail-stop, mail-start
source "$(dirname "$0")/lib.sh"

# The soak instance's PostgreSQL is durable like a deployment's (fsync, synchronous commit and
# full-page writes on, PostgreSQL's defaults), so the `-m immediate` drill proves what a crash
# keeps; `npm test` keeps them off for speed (scripts/test.sh).
PG_EXTRA="-c fsync=on -c synchronous_commit=on -c full_page_writes=on"
start_web() {
  # A restarted web server logs to a new file; the first one's log is kept.
  [ -f "$RUN_DIR/web.log" ] && mv "$RUN_DIR/web.log" "$RUN_DIR/web.$(date +%s).log"
  NODE_ENV=production start_bg web next start -H 127.0.0.1 -p "$WEB_PORT"
  wait_http "$APP_URL/api/v1/health" web
}
kill_bg() {
  local name=$1 pid
  [ -f "$RUN_DIR/$name.pid" ] || die "soak ctl: no $name.pid in $RUN_DIR"
  pid=$(cat "$RUN_DIR/$name.pid")
  kill -KILL -- "-$pid" 2>/dev/null || kill -KILL "$pid" 2>/dev/null || true
  local i
  for i in $(seq 1 50); do kill -0 "$pid" 2>/dev/null || break; sleep 0.1; done
  rm -f "$RUN_DIR/$name.pid"
}
start_mail_fake() {
  start_bg mail node_modules/.bin/maildev --ip 127.0.0.1 --web-ip 127.0.0.1 -s "$SMTP_PORT" -w "$MAIL_WEB_PORT" --mail-directory "$RUN_DIR/mail" --silent
  wait_http "$MAIL_WEB_URL/email" mail
}

if [ "${1:-}" = ctl ]; then
  [ -n "${PG_DATA:-}" ] && [ -n "${RUN_DIR:-}" ] || die "soak ctl: run it from the soak tests (PG_DATA and RUN_DIR unset)"
  case "${2:-}" in
    pg-stop) stop_postgres ;;
    pg-start) start_postgres "$PG_EXTRA" ;;
    pg-kill) pg_run "$(pg_bin_dir)/pg_ctl" -D "$PG_DATA" -m immediate -w stop >/dev/null ;;
    redis-stop) stop_redis ;;
    redis-start) start_redis no ;;
    redis-kill)
      pid=$(cat "$RUN_DIR/redis.pid")
      kill -KILL "$pid"
      for i in $(seq 1 50); do kill -0 "$pid" 2>/dev/null || break; sleep 0.1; done
      rm -f "$RUN_DIR/redis.pid"
      ;;
    web-kill) kill_bg web ;;
    web-start) start_web ;;
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
rm -f "$DATA_DIR/faults.json" "$DATA_DIR/load.json" "$DATA_DIR/drills.json"

start_postgres "$PG_EXTRA"
start_redis no
# The stand-ins first: the demo seed opens the demo lab's payment account at the payment service.
start_fakes
migrate_and_seed
build_web
start_web
BG_NAMES+=(web)
start_service worker node_modules/.bin/tsx worker/main.ts
export TRISKEL_WORKER_PID_FILE="$RUN_DIR/worker.pid"

log "running the soak tests (faults and load; several minutes)"
set +e
TRISKEL_SOAK=1 NODE_ENV=test vitest run --project soak "$@"
rc=$?
set -e
[ $rc -ne 0 ] && log "soak tests failed (exit $rc); service logs are in $RUN_DIR"
for f in faults drills load; do [ -f "$DATA_DIR/$f.json" ] && log "figures: $DATA_DIR/$f.json"; done
exit $rc
