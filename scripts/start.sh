#!/usr/bin/env bash
# `npm start`: install what is missing, start PostgreSQL, Redis, the stand-ins, migrate, load the
# demo data, start the worker and the web app (production build; TRISKEL_DEV=1 for `next dev`).
# Ctrl-C stops everything it started.
source "$(dirname "$0")/lib.sh"

ensure_system_packages start
ensure_node_modules
setup_instance dev "${TRISKEL_PORT_BASE:-3000}"
export NODE_ENV=production

cleanup() {
  trap - EXIT INT TERM
  log "stopping Triskel"
  stop_services
  stop_redis
  stop_postgres
  log "stopped"
}
trap cleanup EXIT
trap 'exit 130' INT TERM

start_postgres
start_redis yes
# The stand-ins first: the demo seed opens the demo lab's payment account at the payment service.
start_fakes
migrate_and_seed

if [ "${TRISKEL_DEV:-0}" = 1 ]; then
  export NODE_ENV=development
  start_service web next dev -H 127.0.0.1 -p "$WEB_PORT"
else
  build_web
  start_service web next start -H 127.0.0.1 -p "$WEB_PORT"
fi
start_service worker node_modules/.bin/tsx worker/main.ts
wait_http "$APP_URL/api/v1/health" web

cat >&2 <<MSG

  Triskel is running at $APP_URL
  Demo sign-in: owner@larkspur.example (see README, "Demo data"); API tokens in $DEMO_TOKENS_FILE
  Logs: $RUN_DIR/*.log
  Press Ctrl-C to stop every process this command started.

MSG

# Stay in the foreground; if the web app or the worker dies, say so and stop the rest.
while true; do
  for name in web worker; do
    if ! kill -0 "$(cat "$RUN_DIR/$name.pid" 2>/dev/null || echo 0)" 2>/dev/null; then
      tail -20 "$RUN_DIR/$name.log" >&2
      die "$name stopped unexpectedly (log: $RUN_DIR/$name.log)"
    fi
  done
  sleep 2
done
