#!/usr/bin/env bash
# npm run start:cluster: npm start's set-up, then nginx (Debian's nginx-light) on PORT (3000) in
# front of two app instances and two workers sharing one PostgreSQL (scripts/run-cluster.ts).
set -euo pipefail
source "$(dirname "$0")/lib.sh"
cd "$ROOT"

ensure_node_modules
if [ ! -x /usr/sbin/nginx ] && [ -z "${HEARTH_NGINX:-}" ]; then
  apt_install nginx-light
fi
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
  node_modules/.bin/next build > "$DATA_DIR/build.log" 2>&1 || { tail -40 "$DATA_DIR/build.log"; exit 1; }
fi
exec node_modules/.bin/tsx scripts/run-cluster.ts
