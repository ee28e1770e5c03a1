#!/usr/bin/env bash
# npm run db:start / db:stop; `bash scripts/pg.sh where` prints where each cluster's files live.
set -euo pipefail
source "$(dirname "$0")/lib.sh"
case "${1:-start}" in
  start) HEARTH_OWN_PG=1 ensure_postgres; log "PostgreSQL on 127.0.0.1:$PG_PORT ($PG_DIR)";;
  stop)
    stop_postgres
    PG_DIR="$DATA_DIR/pg-test" stop_postgres;;
  where)
    pg_home "$PG_DIR"
    pg_home "$DATA_DIR/pg-test";;
  *) echo "usage: pg.sh start|stop|where" >&2; exit 2;;
esac
