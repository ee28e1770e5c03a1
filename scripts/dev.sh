#!/usr/bin/env bash
# npm run dev: PostgreSQL, migrations, seed when empty, the fakes and the worker, then `next dev`.
set -euo pipefail
source "$(dirname "$0")/lib.sh"
cd "$ROOT"
ensure_node_modules
if [ -z "${DATABASE_URL:-}" ]; then ensure_postgres; ensure_database "${HEARTH_DB_NAME:-hearth}"; fi
ensure_session_secret
stack_env 0
node_modules/.bin/tsx db/migrate-cli.ts
node_modules/.bin/tsx db/seed-cli.ts --if-empty
trap 'kill 0' EXIT
node_modules/.bin/tsx scripts/fakes.ts &
node_modules/.bin/tsx watch worker/index.ts &
node_modules/.bin/next dev -H 127.0.0.1 -p "$PORT"
