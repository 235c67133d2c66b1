#!/usr/bin/env bash
# `npm run demo:reset`: the demo from scratch. Stop `npm start` first. Drops every table of the demo database (refused when
# it holds an owner that is not the demo's), migrates and seeds again, writes the new device secrets file the simulator
# reads, and generates the demo's past; the next `npm start` fills the remaining full-rate days in the background.
set -uo pipefail
cd "$(dirname "$0")/../.."
if curl -sf "http://${BW_HOST:-127.0.0.1}:${BW_PORT:-4300}/api/health" >/dev/null 2>&1; then
  echo "[reset] the server is running: stop npm start first"; exit 1
fi
started=0
bash server/scripts/db.sh status >/dev/null 2>&1 || started=1
bash server/scripts/db.sh start || exit 1
rc=0
node --import tsx server/scripts/migrate.ts reset && node --max-semi-space-size=64 --import tsx server/scripts/demo-history.ts fill || rc=1
[ "$started" = 1 ] && bash server/scripts/db.sh stop
exit $rc
