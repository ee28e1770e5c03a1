#!/usr/bin/env bash
# npm test: the same set-up as npm start against a separate test database, then every test.
# HEARTH_TEST_SLOT=N moves the test database and ports so that several runs can share a machine.
set -euo pipefail
source "$(dirname "$0")/lib.sh"
cd "$ROOT"

slot="${HEARTH_TEST_SLOT:-0}"
ensure_node_modules
ensure_chromium
ensure_nginx
# CI audits the production dependencies (npm run audit): a high or critical advisory fails the
# run; a registry that does not answer is reported and the tests go on.
if [ "${CI:-}" = "true" ]; then
  log "auditing the production dependencies (npm audit --omit=dev)"
  node_modules/.bin/tsx scripts/audit.ts
fi
# The tests get a cluster of their own, so that fsync=off never touches the shop's data.
PG_DIR="${HEARTH_TEST_PG_DIR:-$DATA_DIR/pg-test}"
PG_PORT="${HEARTH_TEST_PG_PORT:-$((PG_PORT + 1))}"
HEARTH_PG_FAST=1 HEARTH_OWN_PG=1 ensure_postgres
export HEARTH_DB_NAME="hearth_test${slot/#0/}"
export DATABASE_URL="postgres://postgres@127.0.0.1:$PG_PORT/$HEARTH_DB_NAME"
recreate_database "$HEARTH_DB_NAME"
export SESSION_SECRET="${SESSION_SECRET:-test-secret-$(node -e "process.stdout.write(require('crypto').randomBytes(24).toString('hex'))")}"
stack_env $((100 + slot * 20))
export HEARTH_DATA_DIR="$DATA_DIR/test$slot"
export HEARTH_TEST_OUTPUT="$ROOT/test-results"
export NEXT_DIST_DIR=".next-test$slot"
export NODE_ENV=production
rm -rf "$HEARTH_DATA_DIR/mail" "$HEARTH_DATA_DIR/s3"
mkdir -p "$HEARTH_DATA_DIR" "$HEARTH_TEST_OUTPUT"

if [ -z "${HEARTH_SKIP_TYPECHECK:-}" ]; then
  log "type-checking (tsc --noEmit)"
  node_modules/.bin/tsc --noEmit -p .
fi
log "migrating and seeding $HEARTH_DB_NAME"
node_modules/.bin/tsx db/migrate-cli.ts
node_modules/.bin/tsx db/seed-cli.ts
if [ -z "${HEARTH_SKIP_BUILD:-}" ] || [ ! -d "$NEXT_DIST_DIR" ]; then
  log "building the app into $NEXT_DIST_DIR"
  next_build "$HEARTH_DATA_DIR/build.log" || { tail -60 "$HEARTH_DATA_DIR/build.log"; exit 1; }
fi
log "running the tests"
exec node_modules/.bin/vitest run "$@"
