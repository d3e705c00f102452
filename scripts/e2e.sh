#!/usr/bin/env bash
# Browser tests: a fresh demo database, a production build, then Playwright (which starts the app).
set -euo pipefail
cd "$(dirname "$0")/.."
E2E_DIR=$(mktemp -d /tmp/oscillab-e2e-XXXX)
export DATABASE_URL="sqlite:${E2E_DIR}/e2e.sqlite"
export UPLOAD_DIR="${E2E_DIR}/uploads"
export NEXTAUTH_SECRET=${NEXTAUTH_SECRET:-oscillab-test-secret}
export E2E_PORT=${E2E_PORT:-3100}
export NEXTAUTH_URL=http://localhost:${E2E_PORT}
# The learning-platform stand-in (playwright.config.ts starts it); the demo seed registers it at this address.
export E2E_PLATFORM_PORT=${E2E_PLATFORM_PORT:-$((E2E_PORT + 50))}
export LTI_DEMO_PLATFORM_URL=http://127.0.0.1:${E2E_PLATFORM_PORT}
export NEXT_TELEMETRY_DISABLED=1
npx sequelize-cli db:migrate > /dev/null
npm run --silent db:seed > /dev/null
npm run --silent build > "${E2E_DIR}/build.log" 2>&1 || { tail -50 "${E2E_DIR}/build.log"; exit 1; }
# First-load JS per route; fails when what every page loads is over the budget (scripts/size.mjs).
node scripts/size.mjs
npx playwright test "$@"
