#!/usr/bin/env bash
# npm test: installs what it needs, starts its own PostgreSQL (port 54339, separate from the
# demo's), builds the app, runs every test layer, and stops what it started even on failure.
set -euo pipefail
cd "$(dirname "$0")/.."

source scripts/lib.sh
ensure_node_modules
ensure_chromium

# Several checkouts or engineers on one machine can pick their own cluster and ports.
PG_NAME="${TILTHMARK_TEST_PG_NAME:-test}"
PG_PORT="${TILTHMARK_TEST_PG_PORT:-54339}"
if [ -z "${DATABASE_URL:-}" ]; then
  trap 'bash scripts/pg.sh stop "$PG_NAME" "$PG_PORT"' EXIT
  bash scripts/pg.sh start "$PG_NAME" "$PG_PORT"
  export DATABASE_URL="$(bash scripts/pg.sh url "$PG_NAME" "$PG_PORT")"
fi

# Every test database is cloned from this migrated template.
export TILTHMARK_TEST_ADMIN_URL="${DATABASE_URL%/*}/postgres"
npx tsx tests/support/prepare-template.ts

npx react-router typegen
npx tsc --noEmit
npx react-router build
npx vitest run "$@"
