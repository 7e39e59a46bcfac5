#!/usr/bin/env bash
# npm run db:backup [-- DIR] — a timestamped pg_dump archive of DATABASE_URL (or the demo cluster).
# Uploaded files live in the database (bytea), so the archive holds everything.
set -euo pipefail
cd "$(dirname "$0")/.."
source scripts/lib.sh
url="$(database_url)"
dir="${1:-.data/backups}"
mkdir -p "$dir"
file="$dir/tilthmark-$(date -u +%Y%m%dT%H%M%SZ).dump"
"$(pg_bin)/pg_dump" --format=custom --no-owner --no-privileges --file="$file" "$url"
echo "$file"
