#!/usr/bin/env bash
# npm run start:cluster: npm start's set-up, then nginx (Debian's nginx-light) on PORT (3000) in
# front of two app instances and two workers sharing one PostgreSQL (scripts/run-cluster.ts).
set -euo pipefail
source "$(dirname "$0")/lib.sh"
cd "$ROOT"

ensure_node_modules
ensure_nginx
prepare_production
exec node_modules/.bin/tsx scripts/run-cluster.ts
