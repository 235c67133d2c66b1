#!/usr/bin/env bash
# The external message engine for large fleets: NATS 2.9 with JetStream and its MQTT gateway (Debian's nats-server),
# one node or a cluster of several on 127.0.0.1, each with its own data folder. Units connect to the MQTT gateway as
# they connect to the built-in broker; their users are written from the unit table (server/scripts/engine-users.ts,
# then by the server on every unit change).
# Usage: engine.sh start|stop|status
#   BW_ENGINE_DIR        folder (default .data/nats): units.conf, n<i>.conf, n<i>.pid, n<i>.log, n<i>/ (JetStream)
#   BW_ENGINE_NODES      nodes (default 1; 3 for a cluster that survives one node)
#   BW_ENGINE_PORT       client port of node 1 (default 4222; node i uses +i-1)
#   BW_ENGINE_MQTT_PORT  MQTT port of node 1 (default 1885; node i uses +i-1)
#   BW_ENGINE_CLUSTER_PORT  route port of node 1 (default 6222; node i uses +i-1)
#   BW_ENGINE_PASSWORD   the service user's password (servers and workers); BW_DB_* to read the unit table
set -euo pipefail
cd "$(dirname "$0")/../.."
ROOT=$PWD
DIR=${BW_ENGINE_DIR:-$ROOT/.data/nats}
case "$DIR" in /*) ;; *) DIR=$ROOT/$DIR ;; esac
NODES=${BW_ENGINE_NODES:-1}
PORT=${BW_ENGINE_PORT:-4222}
MQTT_PORT=${BW_ENGINE_MQTT_PORT:-1885}
CLUSTER_PORT=${BW_ENGINE_CLUSTER_PORT:-6222}

say() { echo "[engine] $*" >&2; }
running() { [ -f "$DIR/n$1.pid" ] && kill -0 "$(cat "$DIR/n$1.pid")" 2>/dev/null; }

node_conf() { # i
  local i=$1 routes="" j
  for j in $(seq 1 "$NODES"); do
    [ "$j" = "$i" ] && continue
    routes="$routes nats://127.0.0.1:$((CLUSTER_PORT + j - 1))"
  done
  cat <<CONF
# Written by server/scripts/engine.sh.
server_name: bw-n$i
listen: 127.0.0.1:$((PORT + i - 1))
pid_file: "$DIR/n$i.pid"
log_file: "$DIR/n$i.log"
max_payload: 65536
jetstream { store_dir: "$DIR/n$i" }
mqtt { listen: 127.0.0.1:$((MQTT_PORT + i - 1)), ack_wait: "30s" }
include units.conf
CONF
  if [ "$NODES" -gt 1 ]; then
    echo "cluster { name: bw, listen: 127.0.0.1:$((CLUSTER_PORT + i - 1)), routes: [${routes# }] }" | sed 's/ nats/, nats/g'
  fi
}

start() {
  bash server/scripts/db.sh ensure-nats
  [ -n "${BW_ENGINE_PASSWORD:-}" ] || { say "set BW_ENGINE_PASSWORD (the service user's password)"; exit 1; }
  mkdir -p "$DIR"
  chmod 700 "$DIR"
  # A benchmark writes its own users file (BW_ENGINE_USERS_WRITTEN=1); otherwise they come from the unit table.
  [ "${BW_ENGINE_USERS_WRITTEN:-0}" = 1 ] || BW_ENGINE_DIR=$DIR node --import tsx server/scripts/engine-users.ts
  local i
  for i in $(seq 1 "$NODES"); do
    if running "$i"; then say "node $i already running (pid $(cat "$DIR/n$i.pid"))"; continue; fi
    node_conf "$i" >"$DIR/n$i.conf"
    nats-server -c "$DIR/n$i.conf" >/dev/null 2>&1 &
  done
  for i in $(seq 1 "$NODES"); do
    for _ in $(seq 1 100); do
      grep -q "Server is ready" "$DIR/n$i.log" 2>/dev/null && running "$i" && break
      sleep 0.1
    done
    running "$i" || { say "node $i did not start; last lines of $DIR/n$i.log:"; tail -20 "$DIR/n$i.log" >&2 || true; exit 1; }
  done
  # The readings stream exists before any unit publishes, so nothing is acknowledged to no one.
  BW_ENGINE_URLS=${BW_ENGINE_URLS:-nats://127.0.0.1:$PORT} BW_ENGINE_REPLICAS=${BW_ENGINE_REPLICAS:-$(( NODES < 3 ? NODES : 3 ))} \
    node --import tsx server/scripts/engine-stream.ts
  say "$NODES node(s) ready: clients 127.0.0.1:$PORT, MQTT 127.0.0.1:$MQTT_PORT (data $DIR)"
}

stop() {
  local i pid
  for i in $(seq 1 "$NODES"); do
    running "$i" || continue
    pid=$(cat "$DIR/n$i.pid")
    kill -TERM "$pid"
    for _ in $(seq 1 100); do kill -0 "$pid" 2>/dev/null || break; sleep 0.1; done
    kill -0 "$pid" 2>/dev/null && { say "node $i (pid $pid) did not stop within 10 s"; exit 1; }
    rm -f "$DIR/n$i.pid"
  done
  say "stopped"
}

case "${1:-}" in
  start) start ;;
  stop) stop ;;
  status)
    up=0
    for i in $(seq 1 "$NODES"); do running "$i" && up=$((up + 1)); done
    echo "$up of $NODES node(s) running"
    [ "$up" = "$NODES" ] ;;
  *) echo "usage: engine.sh start|stop|status" >&2; exit 2 ;;
esac
