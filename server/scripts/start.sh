#!/usr/bin/env bash
# `npm start`: private MariaDB (installed from Debian's packages if missing) → migrations and demo seed (empty database only)
# → dashboard build (when sources changed) → the demo's past (first start) or the gap since the last run (restart), before
# the comms watch can see it → server with embedded broker → simulator, and the rest of the full-rate past in the
# background. Ctrl-C stops all of it, MariaDB included.
set -uo pipefail
cd "$(dirname "$0")/../.."
export NG_CLI_ANALYTICS=false
# The demo also offers MQTT over TLS (development certificate in .data/tls/ unless BW_BROKER_TLS_CERT/KEY are set).
export BW_BROKER_TLS_PORT=${BW_BROKER_TLS_PORT-8883}
PORT=${BW_PORT:-4300}
HOST=${BW_HOST:-127.0.0.1}
children=()
# Helpers that may finish on their own (the background history fill): stopped with the rest, never waited for.
helpers=()

stop_all() {
  trap - INT TERM EXIT
  echo; echo "[start] stopping…"
  for pid in "${helpers[@]}"; do kill -TERM "$pid" 2>/dev/null; wait "$pid" 2>/dev/null; done
  # Newest first: the simulator disconnects before the broker goes, the server drains before MariaDB stops.
  for ((i = ${#children[@]} - 1; i >= 0; i--)); do
    kill -TERM "${children[$i]}" 2>/dev/null
    wait "${children[$i]}" 2>/dev/null
  done
  bash server/scripts/db.sh stop
  exit 0
}
trap stop_all INT TERM
trap 'bash server/scripts/db.sh stop' EXIT

bash server/scripts/db.sh start || exit 1
echo "[start] demo mode: the invented demo world with its well-known demo passwords (for trying the product, never for real units)"
node --import tsx server/scripts/migrate.ts latest --demo || exit 1

# Rebuild the dashboard when it is missing or any source is newer than the last build.
index=dist/web/browser/index.html
if [ ! -f "$index" ] || [ -n "$(find src shared angular.json -newer "$index" -type f -print -quit)" ]; then
  echo "[start] building the dashboard (about half a minute)…"
  npx ng build >/tmp/brightward-build.log 2>&1 || { tail -40 /tmp/brightward-build.log; exit 1; }
fi

# The demo's past: the rollups of 13 months, the last day at full rate and the alarms of that past (first start), or the
# gap since the last run; bulk-loaded, so it raises no current alarm. BW_DEMO_HISTORY_DAYS (default 7; 0 = none) sets
# the full-rate days; the days after the first fill in the background, with progress on the admin page.
# A fill that fails does not keep the product from starting: it says so here and on the admin page, and the next start
# does it again.
node --max-semi-space-size=64 --import tsx server/scripts/demo-history.ts fill ||
  echo "[start] the demo's past could not be generated (see above); starting without it, the next start tries again"

# The demo's past months get their locked statements (silently, no mail); the server's lock job locks the newest due
# month at its first sweep and mails only that one to each owner.
node --import tsx server/scripts/statement-locks.ts past ||
  echo "[start] the past months' statements could not be locked (see above); the server's lock job tries again"
# The local mail service: every message the server sends lands in .data/mail/ (nothing leaves the machine).
export BW_SMTP_HOST=127.0.0.1 BW_SMTP_PORT=${BW_SMTP_PORT:-2525}
setsid node --import tsx server/scripts/mail-sink.ts &
children+=($!)

# Own sessions: Ctrl-C reaches this script only, which then stops the children in order. The server runs under a
# supervisor that starts it again if it ever dies (units store and forward meanwhile, and unacknowledged readings are resent).
setsid bash server/scripts/supervise.sh server node --import tsx server/main.ts &
server_pid=$!
children+=($server_pid)
for _ in $(seq 1 100); do curl -sf "http://$HOST:$PORT/api/health" >/dev/null 2>&1 && break; sleep 0.2; done
if ! kill -0 "$server_pid" 2>/dev/null; then echo "[start] the server did not start (see above)"; exit 1; fi

setsid node --max-semi-space-size=64 --import tsx server/scripts/demo-history.ts background &
helpers+=($!)

if [ -f simulator/main.ts ] && [ "${BW_SIMULATOR:-on}" != off ]; then
  setsid node --import tsx simulator/main.ts --demo &
  children+=($!)
fi

cat <<MSG

  Brightward is running at http://$HOST:$PORT
  Demo sign-ins (password for all: brightward-demo):
    admin@saltmarsh.example      admin            engineer@saltmarsh.example   engineer
    tech1@saltmarsh.example      technician       crew1@saltmarsh.example      field crew
    owner@quillmoor.example      owner (Quillmoor Energy Cooperative)
    owner@fenwicklane.example    owner (Fenwick Lane Schools Trust)
    owner@tindara.example        owner (Tindara Water Cooperative)
    owner@nyasoro.example        owner (Nyasoro Clinics Trust)
    owner@wattlebank.example     owner (Wattlebank Islands Energy Co-op)
    owner@cedarflats.example     owner (Cedar Flats Irrigation District)
  Mail goes to the local mail service on 127.0.0.1:$BW_SMTP_PORT and is kept in .data/mail/ (admins: Outbox).
  MQTT broker on ${BW_BROKER_HOST:-127.0.0.1}:${BW_BROKER_PORT:-1884}${BW_BROKER_TLS_PORT:+, MQTT over TLS on port $BW_BROKER_TLS_PORT (${BW_BROKER_TLS_CERT:-development certificate .data/tls/broker-cert.pem})}.
  Press Ctrl-C to stop everything.

MSG
wait -n "${children[@]}"
echo "[start] a process exited; stopping the rest"
stop_all
