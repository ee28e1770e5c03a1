#!/usr/bin/env bash
# npm start: install what is missing, start PostgreSQL, migrate, seed an empty database,
# build, then run the app, the worker and the local fakes until Ctrl-C.
set -euo pipefail
source "$(dirname "$0")/lib.sh"
cd "$ROOT"

ensure_node_modules
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
exec node_modules/.bin/tsx scripts/run-stack.ts
