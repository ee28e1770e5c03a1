#!/usr/bin/env bash
# Shared set-up steps for npm start, npm test and npm run dev. Each step is idempotent.
ROOT="$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)"
DATA_DIR="${HEARTH_DATA_DIR:-$ROOT/.data}"
PG_PORT="${HEARTH_PG_PORT:-54329}"
PG_BIN="${HEARTH_PG_BIN:-/usr/lib/postgresql/15/bin}"
PG_DIR="${HEARTH_PG_DIR:-$DATA_DIR/pg}"
export HEARTH_DATA_DIR="$DATA_DIR"

log() { printf '\033[38;5;173m[hearth]\033[0m %s\n' "$*"; }

is_root() { [ "$(id -u)" = "0" ]; }

# Installs node_modules when missing or older than the lock file.
ensure_node_modules() {
  if [ ! -d "$ROOT/node_modules/.bin" ] || [ ! -f "$ROOT/node_modules/.package-lock.json" ] \
     || [ "$ROOT/package-lock.json" -nt "$ROOT/node_modules/.package-lock.json" ]; then
    log "installing dependencies (npm ci)"
    # --include=dev: the build needs its devDependencies (Tailwind's PostCSS plugin, TypeScript),
    # and npm leaves them out when NODE_ENV=production is in the environment.
    (cd "$ROOT" && npm ci --include=dev --no-audit --no-fund)
  fi
}

apt_install() {
  if ! is_root; then
    log "missing $* and not running as root: install it with apt-get install -y $*"
    return 1
  fi
  log "installing $* with apt-get"
  if ! DEBIAN_FRONTEND=noninteractive apt-get install -y -qq "$@" >/dev/null 2>&1; then
    apt-get update -qq >/dev/null 2>&1 || true
    DEBIAN_FRONTEND=noninteractive apt-get install -y -qq "$@" >/dev/null
  fi
}

ensure_postgres_binaries() {
  if [ ! -x "$PG_BIN/initdb" ]; then
    apt_install postgresql
  fi
  if ! id postgres >/dev/null 2>&1; then
    if is_root; then useradd --system --no-create-home --shell /usr/sbin/nologin postgres; fi
  fi
}

# nginx for the multi-instance arrangement (npm run start:cluster and its test).
ensure_nginx() {
  if [ -z "${HEARTH_NGINX:-}" ] && [ ! -x /usr/sbin/nginx ] && [ ! -x /usr/bin/nginx ]; then
    apt_install nginx-light
  fi
}

ensure_chromium() {
  if [ -z "${HEARTH_CHROMIUM:-}" ] && [ ! -x /usr/bin/chromium ]; then
    apt_install chromium
  fi
}

# Runs a PostgreSQL command as the unprivileged server user when we are root.
pg_as() {
  if is_root; then runuser -u postgres -- "$@"; else "$@"; fi
}

# Where the cluster of PG_DIR really lives. PostgreSQL refuses to run as root, so as root the
# server runs as the `postgres` user, which must be able to reach its data folder. A checkout
# under a folder closed to other users (root's home is 0700, so is a mktemp -d folder) cannot
# hold it; its cluster then lives in /var/lib/hearth/<hash of the folder's path>/<name>, owned by
# postgres, and the same checkout finds the same cluster again. Not root: the server runs as
# the invoking user in PG_DIR itself.
pg_home() {
  local dir="$1"
  if ! is_root || ! id postgres >/dev/null 2>&1; then printf '%s\n' "$dir"; return 0; fi
  local parent; parent="$(dirname "$dir")"
  mkdir -p "$parent"
  # root creates the folder and hands it over; the server user must only be able to pass through
  if runuser -u postgres -- test -x "$parent" 2>/dev/null; then
    printf '%s\n' "$dir"
    return 0
  fi
  local id; id="$(printf '%s' "$(realpath -m "$dir")" | sha256sum | cut -c1-16)"
  printf '%s\n' "${HEARTH_PG_HOME_ROOT:-/var/lib/hearth}/$id/$(basename "$dir")"
}

# Starts the project's own cluster: data in $DATA_DIR/pg (see pg_home), socket beside it, 127.0.0.1:$PG_PORT.
ensure_postgres() {
  if [ -n "${DATABASE_URL:-}" ] && [ -z "${HEARTH_OWN_PG:-}" ]; then
    log "using DATABASE_URL from the environment"
    return 0
  fi
  ensure_postgres_binaries
  local wanted="$PG_DIR"
  PG_DIR="$(pg_home "$PG_DIR")"
  if [ "$PG_DIR" != "$wanted" ]; then
    log "$wanted is out of the postgres user's reach; the cluster lives in $PG_DIR"
    mkdir -p "$(dirname "$PG_DIR")"
    chown postgres "$(dirname "$PG_DIR")"
    mkdir -p "$(dirname "$wanted")"
    printf '%s\n' "$PG_DIR" > "$wanted.location"
  fi
  local pgdata="$PG_DIR/data" sock="$PG_DIR/run"
  mkdir -p "$pgdata" "$sock"
  # several test runs may start at once: one of them creates and starts the cluster
  exec 9>"$PG_DIR.lock"
  flock 9
  if is_root; then chown -R postgres "$PG_DIR"; chmod 700 "$pgdata"; fi
  if [ ! -f "$pgdata/PG_VERSION" ]; then
    log "creating the database cluster in $pgdata"
    pg_as "$PG_BIN/initdb" -D "$pgdata" -U postgres --auth=trust --encoding=UTF8 --locale=C.UTF-8 >/dev/null
    cat >> "$pgdata/postgresql.conf" <<CONF
listen_addresses = '127.0.0.1'
port = $PG_PORT
unix_socket_directories = '$sock'
max_connections = 200
shared_buffers = 128MB
CONF
  fi
  if ! "$PG_BIN/pg_isready" -q -h 127.0.0.1 -p "$PG_PORT" -U postgres -d postgres; then
    if [ -f "$pgdata/postmaster.pid" ]; then
      local pid; pid=$(head -1 "$pgdata/postmaster.pid")
      if ! ps -p "$pid" -o comm= 2>/dev/null | grep -q postgres; then
        log "removing a stale postmaster.pid"
        rm -f "$pgdata/postmaster.pid"
      fi
    fi
    local opts=()
    # fsync off only for a cluster that holds nothing but test data
    [ "${HEARTH_PG_FAST:-}" = "1" ] && opts=(-o "-c fsync=off -c synchronous_commit=off")
    pg_as "$PG_BIN/pg_ctl" -D "$pgdata" -l "$PG_DIR/server.log" -w -t 60 "${opts[@]}" start >/dev/null
  fi
  flock -u 9
  export DATABASE_URL="postgres://postgres@127.0.0.1:$PG_PORT/${HEARTH_DB_NAME:-hearth}"
}

stop_postgres() {
  PG_DIR="$(pg_home "$PG_DIR")"
  local pgdata="$PG_DIR/data"
  if [ -f "$pgdata/postmaster.pid" ]; then
    pg_as "$PG_BIN/pg_ctl" -D "$pgdata" -m fast -w stop >/dev/null && log "PostgreSQL stopped ($PG_DIR)"
  else
    log "PostgreSQL is not running ($PG_DIR)"
  fi
}

# SESSION_SECRET from the environment, else one generated once into the data directory.
ensure_session_secret() {
  if [ -z "${SESSION_SECRET:-}" ]; then
    local f="$DATA_DIR/session-secret"
    if [ ! -s "$f" ]; then
      mkdir -p "$DATA_DIR"
      (umask 077; node -e "process.stdout.write(require('crypto').randomBytes(48).toString('base64url'))" > "$f")
    fi
    SESSION_SECRET="$(cat "$f")"
    export SESSION_SECRET
  fi
}

# Creates the database named in DATABASE_URL's path when it is missing (own cluster only).
ensure_database() {
  local name="$1"
  [ -n "${HEARTH_EXTERNAL_DB:-}" ] && return 0
  if ! "$PG_BIN/psql" -h 127.0.0.1 -p "$PG_PORT" -U postgres -d postgres -tAc "select 1 from pg_database where datname = '$name'" | grep -q 1; then
    "$PG_BIN/createdb" -h 127.0.0.1 -p "$PG_PORT" -U postgres "$name"
  fi
}

recreate_database() {
  local name="$1"
  "$PG_BIN/psql" -q -h 127.0.0.1 -p "$PG_PORT" -U postgres -d postgres -c "drop database if exists \"$name\" with (force)" >/dev/null
  "$PG_BIN/createdb" -h 127.0.0.1 -p "$PG_PORT" -U postgres "$name"
}

# Ports and addresses of the app and its local fakes. BASE moves them all (tests use another).
stack_env() {
  local base="${1:-0}"
  export PORT="${PORT:-$((3000 + base))}"
  export SMTP_PORT="${SMTP_PORT:-$((2525 + base))}"
  export MAIL_CAPTURE_PORT="${MAIL_CAPTURE_PORT:-$((2526 + base))}"
  export S3_PORT="${S3_PORT:-$((4569 + base))}"
  export WEBHOOK_RECEIVER_PORT="${WEBHOOK_RECEIVER_PORT:-$((2527 + base))}"
  export APP_URL="${APP_URL:-http://127.0.0.1:$PORT}"
  export MAIL_CAPTURE_URL="${MAIL_CAPTURE_URL:-http://127.0.0.1:$MAIL_CAPTURE_PORT}"
  export S3_ENDPOINT="${S3_ENDPOINT:-http://127.0.0.1:$S3_PORT}"
  export WEBHOOK_RECEIVER_URL="${WEBHOOK_RECEIVER_URL:-http://127.0.0.1:$WEBHOOK_RECEIVER_PORT}"
  export SMTP_HOST="${SMTP_HOST:-127.0.0.1}"
}

# next build, leaving the tracked tsconfig.json as it was: Next.js adds its output folder's
# type paths (.next-test1/types/**/*.ts, …) to `include` whenever they are not listed literally.
next_build() {
  local log_file="$1" saved
  saved="$(mktemp)"
  cp "$ROOT/tsconfig.json" "$saved"
  local rc=0
  node_modules/.bin/next build > "$log_file" 2>&1 || rc=$?
  cmp -s "$saved" "$ROOT/tsconfig.json" || cat "$saved" > "$ROOT/tsconfig.json"
  rm -f "$saved"
  return $rc
}

# What npm start and npm run start:cluster do before they start their processes: the database
# (own cluster unless DATABASE_URL is given), the session secret, the ports, the schema and the
# demo data in an empty database, then the production build (unless HEARTH_SKIP_BUILD).
prepare_production() {
  if [ -z "${DATABASE_URL:-}" ]; then
    ensure_postgres
    ensure_database "${HEARTH_DB_NAME:-hearth}"
  else
    log "using DATABASE_URL from the environment"
  fi
  ensure_session_secret
  stack_env 0
  export NODE_ENV=production

  log "migrating"
  node_modules/.bin/tsx db/migrate-cli.ts
  node_modules/.bin/tsx db/seed-cli.ts --if-empty
  if [ -z "${HEARTH_SKIP_BUILD:-}" ]; then
    log "building the app (next build)"
    next_build "$DATA_DIR/build.log" || { tail -40 "$DATA_DIR/build.log"; exit 1; }
  fi
}
