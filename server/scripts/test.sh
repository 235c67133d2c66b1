#!/usr/bin/env bash
# `npm test`: every suite against a private test MariaDB (own port and data dir; never the demo data).
#   0. lint   1. Node suites (shared, server, broker, simulator) with vitest   2. Angular unit tests (ng test)
#   3. build the dashboard, then end-to-end tests in headless Chromium
# Exits non-zero when any step fails; always stops the database it started.
set -uo pipefail
cd "$(dirname "$0")/../.."
export BW_DB_DIR=${BW_TEST_DB_DIR:-.data/mariadb-test}
export BW_DB_PORT=${BW_TEST_DB_PORT:-3308}
export BW_DB_NAME=bw_test BW_DB_USER=bw_test BW_DB_PASSWORD=bw-test-only BW_DB_SUPER=1
export BW_LOG_LEVEL=${BW_LOG_LEVEL:-silent} NG_CLI_ANALYTICS=false
started=0
cleanup() { [ "$started" = 1 ] && bash server/scripts/db.sh stop; }
trap cleanup EXIT
trap 'exit 130' INT TERM

bash server/scripts/db.sh ensure-chromium || exit 1
# The statement PDF tests read the PDF's text with pdftotext (Debian's poppler-utils).
bash server/scripts/db.sh ensure-poppler || exit 1
# The message engine tests start a NATS node of their own (Debian's nats-server).
bash server/scripts/db.sh ensure-nats || exit 1
if ! bash server/scripts/db.sh status >/dev/null 2>&1; then started=1; fi
bash server/scripts/db.sh start || exit 1

failed=()
step() { # name command...
  local name=$1; shift
  echo; echo "=== $name"
  local t0=$SECONDS
  if "$@"; then echo "=== $name: ok ($((SECONDS - t0)) s)"; else echo "=== $name: FAILED ($((SECONDS - t0)) s)"; failed+=("$name"); fi
}
step "lint (layering, TypeScript, Angular)" npx eslint --config .config/eslint.config.mjs .
step "format (Prettier)" npx prettier --check --log-level warn .
step "typecheck (server, broker, shared, simulator, tests)" npx tsc -p test/tsconfig.json
step "node suites (vitest)" npx vitest run --config test/vitest.config.ts
step "angular unit tests" npx ng test --watch=false
step "build dashboard" npx ng build
step "end-to-end (headless chromium)" node --import tsx test/e2e/run.ts

echo
if [ ${#failed[@]} -gt 0 ]; then echo "npm test: FAILED steps: ${failed[*]}"; exit 1; fi
echo "npm test: all steps passed"
