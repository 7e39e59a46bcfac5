#!/usr/bin/env bash
# npm start: everything from a fresh clone to the demo at http://127.0.0.1:3000.
set -euo pipefail
cd "$(dirname "$0")/.."

source scripts/lib.sh
ensure_node_modules

PG_PORT=54329
if [ -z "${DATABASE_URL:-}" ]; then
  bash scripts/pg.sh start dev "$PG_PORT"
  export DATABASE_URL="$(bash scripts/pg.sh url dev "$PG_PORT")"
  trap 'bash scripts/pg.sh stop dev "$PG_PORT"' EXIT
fi

npx tsx scripts/migrate.ts
npx tsx scripts/seed.ts --if-empty
npx react-router build

export TILTHMARK_DEMO=1 NODE_ENV=production HOST=127.0.0.1 PORT="${PORT:-3000}"
export TILTHMARK_BASE_URL="${TILTHMARK_BASE_URL:-http://127.0.0.1:$PORT}"
echo "[start] Tilthmark demo at $TILTHMARK_BASE_URL (accounts in README.md; mail at /dev/mailbox)" >&2
node server.js build/server/index.js
