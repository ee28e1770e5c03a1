#!/usr/bin/env bash
# npm start: install what is missing, start PostgreSQL, migrate, seed an empty database,
# build, then run the app, the worker and the local fakes until Ctrl-C.
set -euo pipefail
source "$(dirname "$0")/lib.sh"
cd "$ROOT"

ensure_node_modules
prepare_production
exec node_modules/.bin/tsx scripts/run-stack.ts
