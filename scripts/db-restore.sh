#!/usr/bin/env bash
# npm run db:restore -- FILE — restores a db:backup archive into DATABASE_URL (or the demo cluster),
# which must be empty: restoring over live data is refused.
set -euo pipefail
cd "$(dirname "$0")/.."
source scripts/lib.sh
file="${1:?usage: npm run db:restore -- FILE}"
[ -f "$file" ] || { echo "No such backup file: $file" >&2; exit 2; }
url="$(database_url)"
tables=$("$(pg_bin)/psql" "$url" -tAc "select count(*) from information_schema.tables where table_schema='public'")
if [ "$tables" != "0" ]; then
  echo "The target database is not empty ($tables tables). Restore into a new, empty database." >&2
  exit 3
fi
"$(pg_bin)/pg_restore" --no-owner --no-privileges --exit-on-error --dbname="$url" "$file"
echo "restored $file" >&2
