#!/usr/bin/env bash
# Shared helpers for scripts/start.sh and scripts/test.sh: install what is missing, start and
# stop PostgreSQL, Redis, the local stand-ins (fakes/), the worker and the web app.
set -euo pipefail

ROOT=$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)
cd "$ROOT"
export NEXT_TELEMETRY_DISABLED=1
export PATH="$ROOT/node_modules/.bin:$PATH"

log() { printf '\033[36m[triskel]\033[0m %s\n' "$*" >&2; }
die() { printf '\033[31m[triskel] %s\033[0m\n' "$*" >&2; exit 1; }

as_root() { if [ "$(id -u)" = 0 ]; then "$@"; else sudo "$@"; fi; }

pg_bin_dir() {
  local d
  d=$(ls -d /usr/lib/postgresql/*/bin 2>/dev/null | sort -V | tail -n 1)
  [ -n "$d" ] && [ -x "$d/initdb" ] && echo "$d"
}

APT_UPDATED=0
apt_install() {
  [ $# -eq 0 ] && return 0
  command -v apt-get >/dev/null || die "missing system packages ($*) and no apt-get to install them; install them by hand"
  log "installing system packages: $*"
  if [ "$APT_UPDATED" = 0 ]; then as_root apt-get update -qq; APT_UPDATED=1; fi
  as_root env DEBIAN_FRONTEND=noninteractive apt-get install -y -qq --no-install-recommends "$@" >/dev/null
}

# ensure_system_packages start|test
ensure_system_packages() {
  local mode=$1 missing=()
  pg_bin_dir >/dev/null || missing+=(postgresql)
  command -v redis-server >/dev/null || missing+=(redis-server)
  command -v runuser >/dev/null || missing+=(util-linux)
  # OpenBLAS + LAPACKE for the engine's native kernels (the engine falls back to TypeScript without them).
  [ -e /usr/include/lapacke.h ] || missing+=(liblapacke-dev)
  compgen -G "/usr/include/*/openblas*/cblas.h" >/dev/null || compgen -G "/usr/include/openblas/cblas.h" >/dev/null || missing+=(libopenblas-dev)
  if [ "$mode" = test ]; then
    [ -x /usr/bin/chromium ] || missing+=(chromium)
    /usr/bin/python3 -c 'import numpy' >/dev/null 2>&1 || missing+=(python3-numpy)
  fi
  apt_install "${missing[@]}"
}

ensure_node_modules() {
  if [ ! -d node_modules ] || [ ! -f node_modules/.package-lock.json ] || [ package-lock.json -nt node_modules/.package-lock.json ]; then
    log "installing npm packages (npm ci)"
    npm ci --no-audit --no-fund --loglevel=error
  fi
  # The native OpenBLAS kernels are built by npm's install script; build them here too when
  # node_modules predates the system libraries or scripts were skipped (never fatal).
  [ -e src/engine/native/build/Release/triskel_kernels.node ] || node scripts/build-native.mjs || true
  # Likewise the command line's JavaScript bundle (scripts/build-cli.mjs; never fatal either).
  [ -e dist/engine-cli.mjs ] || node scripts/build-cli.mjs || true
}

# setup_instance NAME PORT_BASE: folders and every environment variable of one instance.
setup_instance() {
  INSTANCE=$1
  BASE=$2
  local hash
  hash=$(printf '%s' "$ROOT" | md5sum | cut -c1-8)
  DATA_DIR="$ROOT/.data/$INSTANCE"
  mkdir -p "$DATA_DIR"
  # PostgreSQL runs as the `postgres` user when we are root: it must be able to reach its folder.
  PG_DATA="$DATA_DIR/pg"
  if [ "$(id -u)" = 0 ] && ! runuser -u postgres -- test -x "$DATA_DIR" 2>/dev/null; then
    PG_DATA="/var/tmp/triskel-$hash/$INSTANCE/pg"
  fi
  PG_SOCK="/tmp/triskel-$hash-$INSTANCE"
  RUN_DIR="$DATA_DIR/run"
  mkdir -p "$RUN_DIR"

  export TRISKEL_INSTANCE=$INSTANCE TRISKEL_DATA_DIR=$DATA_DIR
  export WEB_PORT=$((BASE)) PG_PORT=$((BASE + 1)) REDIS_PORT=$((BASE + 2))
  export CLERK_FAKE_PORT=$((BASE + 3)) STRIPE_FAKE_PORT=$((BASE + 4)) SMTP_PORT=$((BASE + 5)) MAIL_WEB_PORT=$((BASE + 6))
  export DATABASE_URL="postgres://postgres@127.0.0.1:$PG_PORT/triskel"
  export REDIS_URL="redis://127.0.0.1:$REDIS_PORT"
  export APP_URL="http://127.0.0.1:$WEB_PORT"
  export QUEUE_PREFIX="triskel"
  export DEMO_TOKENS_FILE="$DATA_DIR/demo-tokens.json"
  # These scripts run `next start` and the worker with NODE_ENV=production against the local
  # stand-ins (fakes/); src/env.ts refuses the stand-ins' keys in production mode unless told so.
  export TRISKEL_STAND_INS=1
  # Each feature's stand-in adds its variables in scripts/env.d/*.sh (sourced here, in order).
  local f
  for f in "$ROOT"/scripts/env.d/*.sh; do [ -e "$f" ] && source "$f"; done
  return 0
}

pg_run() { if [ "$(id -u)" = 0 ]; then runuser -u postgres -- "$@"; else "$@"; fi; }

start_postgres() {
  local extra=${1:-} bin
  bin=$(pg_bin_dir) || die "PostgreSQL binaries not found under /usr/lib/postgresql"
  mkdir -p "$(dirname "$PG_DATA")" "$PG_SOCK"
  if [ "$(id -u)" = 0 ]; then chown postgres "$(dirname "$PG_DATA")" "$PG_SOCK"; fi
  if [ ! -f "$PG_DATA/PG_VERSION" ]; then
    log "creating PostgreSQL cluster in $PG_DATA"
    mkdir -p "$PG_DATA"
    [ "$(id -u)" = 0 ] && chown postgres "$PG_DATA"
    pg_run "$bin/initdb" -D "$PG_DATA" -U postgres -A trust -E UTF8 --no-locale >"$RUN_DIR/initdb.log" 2>&1 || { cat "$RUN_DIR/initdb.log" >&2; die "initdb failed"; }
  fi
  if pg_run "$bin/pg_ctl" -D "$PG_DATA" status >/dev/null 2>&1; then
    log "PostgreSQL already running on port $PG_PORT"
  else
    rm -f "$PG_DATA/postmaster.pid"
    pg_run "$bin/pg_ctl" -D "$PG_DATA" -w -t 60 -l "$PG_DATA/server.log" \
      -o "-c listen_addresses=127.0.0.1 -p $PG_PORT -k $PG_SOCK $extra" start >/dev/null \
      || { tail -20 "$PG_DATA/server.log" >&2; die "PostgreSQL did not start (port $PG_PORT)"; }
    log "PostgreSQL on 127.0.0.1:$PG_PORT"
  fi
  if ! psql -h 127.0.0.1 -p "$PG_PORT" -U postgres -tAc "select 1 from pg_database where datname='triskel'" | grep -q 1; then
    psql -h 127.0.0.1 -p "$PG_PORT" -U postgres -qc "create database triskel" >/dev/null
  fi
}

stop_postgres() {
  local bin
  bin=$(pg_bin_dir) || return 0
  [ -n "${PG_DATA:-}" ] && [ -f "$PG_DATA/PG_VERSION" ] || return 0
  pg_run "$bin/pg_ctl" -D "$PG_DATA" -m fast -w stop >/dev/null 2>&1 || true
}

start_redis() {
  local persist=${1:-no}
  if redis-cli -h 127.0.0.1 -p "$REDIS_PORT" ping >/dev/null 2>&1; then
    log "Redis already running on port $REDIS_PORT"; return 0
  fi
  local save=(--save '' --appendonly no)
  [ "$persist" = yes ] && save=(--save 60 1 --appendonly no)
  redis-server --bind 127.0.0.1 --port "$REDIS_PORT" "${save[@]}" --dir "$RUN_DIR" \
    --daemonize yes --pidfile "$RUN_DIR/redis.pid" --logfile "$RUN_DIR/redis.log" >/dev/null
  local i
  for i in $(seq 1 50); do redis-cli -h 127.0.0.1 -p "$REDIS_PORT" ping >/dev/null 2>&1 && { log "Redis on 127.0.0.1:$REDIS_PORT"; return 0; }; sleep 0.1; done
  die "Redis did not start (port $REDIS_PORT); see $RUN_DIR/redis.log"
}

stop_redis() {
  [ -n "${REDIS_PORT:-}" ] || return 0
  redis-cli -h 127.0.0.1 -p "$REDIS_PORT" shutdown nosave >/dev/null 2>&1 || true
}

# start_bg NAME COMMAND...: a background process in its own process group, logged to RUN_DIR.
start_bg() {
  local name=$1; shift
  setsid "$@" >"$RUN_DIR/$name.log" 2>&1 < /dev/null &
  echo $! >"$RUN_DIR/$name.pid"
}

stop_bg() {
  local name=$1 pid
  [ -f "$RUN_DIR/$name.pid" ] || return 0
  pid=$(cat "$RUN_DIR/$name.pid")
  if kill -0 "$pid" 2>/dev/null; then
    kill -TERM -- "-$pid" 2>/dev/null || kill -TERM "$pid" 2>/dev/null || true
    local i
    for i in $(seq 1 50); do kill -0 "$pid" 2>/dev/null || break; sleep 0.2; done
    kill -KILL -- "-$pid" 2>/dev/null || true
  fi
  rm -f "$RUN_DIR/$name.pid"
}

# Background processes in the order they stop (reverse of start).
BG_NAMES=()
start_service() { local name=$1; start_bg "$@"; BG_NAMES+=("$name"); }
stop_services() {
  local i
  for ((i = ${#BG_NAMES[@]} - 1; i >= 0; i--)); do stop_bg "${BG_NAMES[$i]}"; done
  BG_NAMES=()
}

wait_http() {
  local url=$1 name=$2 tries=${3:-300} i
  for i in $(seq 1 "$tries"); do
    curl -fsS -o /dev/null "$url" 2>/dev/null && return 0
    if [ -f "$RUN_DIR/$name.pid" ] && ! kill -0 "$(cat "$RUN_DIR/$name.pid")" 2>/dev/null; then
      tail -30 "$RUN_DIR/$name.log" >&2; die "$name exited during start-up (log: $RUN_DIR/$name.log)"
    fi
    sleep 0.2
  done
  tail -30 "$RUN_DIR/$name.log" >&2
  die "$name did not answer at $url"
}

# The local stand-ins for hosted services. Each feature adds its stand-in in scripts/fakes.d/*.sh,
# defining a function named start_fake_<name>; they are started in file order.
start_fakes() {
  local f fn
  for f in "$ROOT"/scripts/fakes.d/*.sh; do
    [ -e "$f" ] || continue
    source "$f"
    fn="start_fake_$(basename "$f" .sh | sed 's/^[0-9]*-//; s/-/_/g')"
    "$fn"
  done
}

migrate_and_seed() {
  log "applying database migrations"
  tsx scripts/migrate.ts
  log "loading demo data"
  tsx scripts/seed.ts
}

build_web() {
  log "building the web app (next build${NEXT_DIST_DIR:+ into $NEXT_DIST_DIR})"
  # A tsconfig per build folder that already names that folder's generated types, so `next build`
  # never rewrites the committed tsconfig.json; it type-checks the app (src/), not the tests.
  local dist=${NEXT_DIST_DIR:-.next}
  export NEXT_TSCONFIG="tsconfig.next.json"
  [ "$dist" != .next ] && NEXT_TSCONFIG="tsconfig.$dist.json"
  NEXT_TSCONFIG=${NEXT_TSCONFIG//\//-}
  cat >"$NEXT_TSCONFIG" <<JSON
{
  "extends": "./tsconfig.json",
  "include": ["next-env.d.ts", "src/**/*.ts", "src/**/*.tsx", "$dist/types/**/*.ts", "$dist/dev/types/**/*.ts"],
  "exclude": ["node_modules", ".data", "tests", "scripts", "fakes", "worker"]
}
JSON
  next build >"$RUN_DIR/build.log" 2>&1 || { tail -60 "$RUN_DIR/build.log" >&2; die "next build failed (log: $RUN_DIR/build.log)"; }
}
