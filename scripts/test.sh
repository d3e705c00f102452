#!/usr/bin/env bash
# Everything: unit tests, integration tests (temporary SQLite databases, a real mail catcher)
# and browser tests (Playwright driving Debian's Chromium). Starts every service it needs.
set -euo pipefail
cd "$(dirname "$0")/.."

ensure_debian_package() { # command package
  if ! command -v "$1" >/dev/null 2>&1; then
    if [ "$(id -u)" = "0" ] && command -v apt-get >/dev/null 2>&1; then
      echo "Installing $2 with apt-get (needed by the tests)…"
      (apt-get update -qq || true) && DEBIAN_FRONTEND=noninteractive apt-get install -y -qq "$2" >/dev/null
    else
      echo "The tests need '$1' (Debian package '$2'). Install it with: sudo apt-get install -y $2" >&2
      exit 1
    fi
  fi
}
ensure_debian_package chromium chromium
ensure_debian_package pdftoppm poppler-utils

export OSCILLAB_TEST_SMTP_PORT=${OSCILLAB_TEST_SMTP_PORT:-1125}
export OSCILLAB_TEST_WEB_PORT=${OSCILLAB_TEST_WEB_PORT:-1180}
export SMTP_URL="smtp://127.0.0.1:${OSCILLAB_TEST_SMTP_PORT}"
export MAILDEV_API="http://127.0.0.1:${OSCILLAB_TEST_WEB_PORT}"
export NEXTAUTH_SECRET=${NEXTAUTH_SECRET:-oscillab-test-secret}

node scripts/maildev.mjs "$OSCILLAB_TEST_SMTP_PORT" "$OSCILLAB_TEST_WEB_PORT" > /tmp/oscillab-test-maildev.log 2>&1 &
MAILDEV_PID=$!
trap 'kill $MAILDEV_PID 2>/dev/null || true' EXIT
for _ in $(seq 1 50); do curl -sf "$MAILDEV_API/api/healthz" >/dev/null 2>&1 && break; sleep 0.2; done

npm run --silent lint
npx tsc --noEmit
npx vitest run --project unit
npx vitest run --project integration

# The same integration suite on PostgreSQL, through the same migrations (a private server on loopback).
PG_ADMIN_URL=$(bash scripts/postgres.sh | tail -n 1)
trap 'kill $MAILDEV_PID 2>/dev/null || true; bash scripts/postgres.sh stop >/dev/null 2>&1 || true' EXIT
OSCILLAB_PG_ADMIN_URL="$PG_ADMIN_URL" npx vitest run --project integration

bash scripts/e2e.sh
