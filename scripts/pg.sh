#!/usr/bin/env bash
# npm run db:start / db:stop
set -euo pipefail
source "$(dirname "$0")/lib.sh"
case "${1:-start}" in
  start) HEARTH_OWN_PG=1 ensure_postgres; log "PostgreSQL on 127.0.0.1:$PG_PORT ($PG_DIR)";;
  stop)
    stop_postgres
    PG_DIR="$DATA_DIR/pg-test" stop_postgres;;
  *) echo "usage: pg.sh start|stop" >&2; exit 2;;
esac
