# Shared helpers for start.sh and test.sh.

# Installs npm dependencies when node_modules is missing or older than the lockfile.
ensure_node_modules() {
  if [ ! -d node_modules ] || [ package-lock.json -nt node_modules/.package-lock.json ]; then
    echo "[setup] installing npm dependencies (npm ci)" >&2
    npm ci --no-audit --no-fund
  fi
}

# Installs Debian's chromium for the browser tests when it is missing (needs root or sudo).
ensure_chromium() {
  if [ ! -x /usr/bin/chromium ]; then
    echo "[setup] installing Debian's chromium for browser tests (needs root or sudo)" >&2
    local sudo=""
    [ "$(id -u)" -ne 0 ] && sudo="sudo"
    $sudo apt-get update -qq
    DEBIAN_FRONTEND=noninteractive $sudo apt-get install -y -qq chromium >/dev/null
  fi
}

# The PostgreSQL client programs (Debian puts them under /usr/lib/postgresql/N/bin).
pg_bin() {
  for dir in /usr/lib/postgresql/*/bin; do
    if [ -x "$dir/pg_dump" ]; then echo "$dir"; return 0; fi
  done
  dirname "$(command -v pg_dump)"
}

# DATABASE_URL, or the demo cluster's address.
database_url() {
  if [ -n "${DATABASE_URL:-}" ]; then echo "$DATABASE_URL"; else bash scripts/pg.sh url dev 54329; fi
}
