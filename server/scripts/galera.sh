#!/usr/bin/env bash
# A replicated MariaDB for large fleets: a Galera cluster of BW_GALERA_NODES nodes (Debian's mariadb-server + galera-4)
# on 127.0.0.1, each with its own data dir, behind haproxy (Debian's haproxy) on one port that leads every connection to
# the same live node until it goes down, then to the next (one writer at a time: no certification conflicts, and the
# servers' named lock lives on one node; Galera does not replicate named locks).
# Usage: galera.sh start|stop|status|start-node <i>|stop-node <i>
#   BW_GALERA_DIR        folder (default .data/galera): n<i>/ data, n<i>.sock/.pid/.err, haproxy.cfg/.pid
#   BW_GALERA_NODES      nodes (default 3)
#   BW_GALERA_PORT       SQL port of node 1 (default 3321; node i uses +i-1)
#   BW_GALERA_PROXY_PORT the port servers connect to (haproxy; default 3320)
#   BW_GALERA_WSREP_PORT replication port of node 1 (default 4567; node i uses +i-1; IST +10, SST +20)
#   BW_DB_NAME / BW_DB_USER / BW_DB_PASSWORD / BW_DB_SUPER  the app account, as for db.sh
set -euo pipefail
cd "$(dirname "$0")/../.."
ROOT=$PWD
DIR=${BW_GALERA_DIR:-$ROOT/.data/galera}
case "$DIR" in /*) ;; *) DIR=$ROOT/$DIR ;; esac
NODES=${BW_GALERA_NODES:-3}
PORT=${BW_GALERA_PORT:-3321}
PROXY_PORT=${BW_GALERA_PROXY_PORT:-3320}
WSREP_PORT=${BW_GALERA_WSREP_PORT:-4567}
NAME=${BW_DB_NAME:-brightward}
USER_NAME=${BW_DB_USER:-brightward}
PASSWORD=${BW_DB_PASSWORD:-brightward-local}
PROVIDER=/usr/lib/galera/libgalera_smm.so
# As root the nodes run as Debian's mysql user: the rsync state transfer's daemon would otherwise write as nobody.
RUN_AS=root
[ "$(id -u)" = 0 ] && id mysql >/dev/null 2>&1 && RUN_AS=mysql

say() { echo "[galera] $*" >&2; }
bin() { command -v "$1" 2>/dev/null || echo "/usr/sbin/$1"; }
running() { [ -f "$DIR/n$1.pid" ] && kill -0 "$(cat "$DIR/n$1.pid")" 2>/dev/null; }
sql() { # i, then SQL on stdin
  "$(bin mariadb)" --no-defaults --protocol=socket --socket="$DIR/n$1.sock" -uroot
}
synced() { [ "$(echo "SHOW STATUS LIKE 'wsrep_local_state_comment'" | sql "$1" 2>/dev/null | awk 'NR==2{print $2}')" = Synced ]; }
members() {
  local i out=""
  for i in $(seq 1 "$NODES"); do out="$out,127.0.0.1:$((WSREP_PORT + i - 1))"; done
  echo "${out#,}"
}

launch() { # i [--wsrep-new-cluster]
  local i=$1; shift
  mkdir -p "$DIR/n$i"
  [ "$RUN_AS" = root ] || chown -R "$RUN_AS:" "$DIR"
  if [ ! -d "$DIR/n$i/mysql" ] && [ $# -gt 0 ]; then
    "$(bin mariadb-install-db)" --no-defaults --datadir="$DIR/n$i" --user="$RUN_AS" --auth-root-authentication-method=socket \
      --skip-test-db --skip-name-resolve >"$DIR/n$i.install.log" 2>&1 || { cat "$DIR/n$i.install.log" >&2; exit 1; }
  fi
  "$(bin mariadbd)" --no-defaults --datadir="$DIR/n$i" --user="$RUN_AS" --bind-address=127.0.0.1 --port=$((PORT + i - 1)) \
    --socket="$DIR/n$i.sock" --pid-file="$DIR/n$i.pid" --log-error="$DIR/n$i.err" --skip-name-resolve \
    --innodb-buffer-pool-size=256M --character-set-server=utf8mb4 --collation-server=utf8mb4_unicode_ci \
    --binlog-format=ROW --default-storage-engine=InnoDB --innodb-autoinc-lock-mode=2 \
    --wsrep-on=ON --wsrep-provider="$PROVIDER" --wsrep-cluster-name=brightward --wsrep-node-name="n$i" \
    --wsrep-cluster-address="gcomm://$(members)" --wsrep-node-address="127.0.0.1:$((WSREP_PORT + i - 1))" \
    --wsrep-node-incoming-address="127.0.0.1:$((PORT + i - 1))" \
    --wsrep-provider-options="gmcast.listen_addr=tcp://127.0.0.1:$((WSREP_PORT + i - 1));ist.recv_addr=127.0.0.1:$((WSREP_PORT + 10 + i - 1))" \
    --wsrep-sst-method=rsync --wsrep-sst-receive-address="127.0.0.1:$((WSREP_PORT + 20 + i - 1))" \
    "$@" >/dev/null 2>&1 &
  local pid=$!
  for _ in $(seq 1 1200); do
    running "$i" && synced "$i" && return 0
    kill -0 "$pid" 2>/dev/null || break
    sleep 0.1
  done
  say "node $i did not reach Synced; last lines of $DIR/n$i.err:"; tail -30 "$DIR/n$i.err" >&2; exit 1
}

proxy() {
  bash server/scripts/db.sh ensure-haproxy
  local i
  {
    echo "global"
    echo "defaults"
    echo "  mode tcp"
    echo "  timeout connect 2s"
    echo "  timeout client 1h"
    echo "  timeout server 1h"
    echo "frontend db"
    echo "  bind 127.0.0.1:$PROXY_PORT"
    echo "  default_backend galera"
    echo "backend galera"
    echo "  option mysql-check user haproxy_check"
    # Every connection goes to one node (the first up) and stays with it until it goes down: one writer, no fail-back
    # (a node coming back must not split the servers between two nodes, each with its own named locks).
    echo "  balance first"
    echo "  stick-table type integer size 1"
    echo "  stick on int(1)"
    # Connections to a node that went down are cut, so clients reconnect to the next one at once.
    echo "  default-server inter 500ms fall 2 rise 2 on-marked-down shutdown-sessions"
    for i in $(seq 1 "$NODES"); do
      echo "  server n$i 127.0.0.1:$((PORT + i - 1)) check"
    done
  } >"$DIR/haproxy.cfg"
  if [ -f "$DIR/haproxy.pid" ] && kill -0 "$(cat "$DIR/haproxy.pid")" 2>/dev/null; then
    # A new proxy takes over the port; the old one finishes its connections (-sf).
    "$(bin haproxy)" -D -f "$DIR/haproxy.cfg" -p "$DIR/haproxy.pid" -sf "$(cat "$DIR/haproxy.pid")"
  else
    "$(bin haproxy)" -D -f "$DIR/haproxy.cfg" -p "$DIR/haproxy.pid"
  fi
}

start() {
  bash server/scripts/db.sh ensure
  command -v rsync >/dev/null 2>&1 || bash server/scripts/db.sh ensure-rsync
  [ -f "$PROVIDER" ] || bash server/scripts/db.sh ensure-galera
  mkdir -p "$DIR"
  local i up=0 first=""
  for i in $(seq 1 "$NODES"); do running "$i" && up=$((up + 1)) && first=${first:-$i}; done
  if [ "$up" = 0 ]; then
    # The node to start the cluster from: the one Galera marked safe (the last to stop), else node 1.
    first=1
    for i in $(seq 1 "$NODES"); do
      grep -qs '^safe_to_bootstrap: 1' "$DIR/n$i/grastate.dat" && { first=$i; break; }
    done
    if [ -f "$DIR/n$first/grastate.dat" ] && ! grep -qs '^safe_to_bootstrap: 1' "$DIR/n$first/grastate.dat"; then
      say "no node was stopped last cleanly: starting from node $first (its last transactions are kept, others' may not be)"
      sed -i 's/^safe_to_bootstrap: 0/safe_to_bootstrap: 1/' "$DIR/n$first/grastate.dat"
    fi
    launch "$first" --wsrep-new-cluster
    say "node $first started the cluster on 127.0.0.1:$((PORT + first - 1))"
    sql "$first" <<SQL
CREATE DATABASE IF NOT EXISTS \`$NAME\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci;
CREATE USER IF NOT EXISTS '$USER_NAME'@'127.0.0.1' IDENTIFIED BY '$PASSWORD';
ALTER USER '$USER_NAME'@'127.0.0.1' IDENTIFIED BY '$PASSWORD';
$( [ "${BW_DB_SUPER:-0}" = 1 ] && echo "GRANT ALL PRIVILEGES ON *.* TO '$USER_NAME'@'127.0.0.1' WITH GRANT OPTION;" || echo "GRANT ALL PRIVILEGES ON \`$NAME\`.* TO '$USER_NAME'@'127.0.0.1';" )
CREATE USER IF NOT EXISTS 'haproxy_check'@'127.0.0.1';
SQL
  fi
  for i in $(seq 1 "$NODES"); do running "$i" || { launch "$i"; say "node $i joined (127.0.0.1:$((PORT + i - 1)))"; }; done
  proxy
  say "$NODES node(s) synced; servers connect to 127.0.0.1:$PROXY_PORT (haproxy)"
}

stop_node() { # i
  running "$1" || return 0
  local pid; pid=$(cat "$DIR/n$1.pid")
  kill -TERM "$pid"
  for _ in $(seq 1 300); do kill -0 "$pid" 2>/dev/null || break; sleep 0.1; done
  kill -0 "$pid" 2>/dev/null && { say "node $1 (pid $pid) did not stop within 30 s"; exit 1; }
  return 0
}

stop() {
  if [ -f "$DIR/haproxy.pid" ] && kill -0 "$(cat "$DIR/haproxy.pid")" 2>/dev/null; then kill -TERM "$(cat "$DIR/haproxy.pid")"; fi
  rm -f "$DIR/haproxy.pid"
  local i
  for i in $(seq "$NODES" -1 1); do stop_node "$i"; done
  say "stopped"
}

case "${1:-}" in
  start) start ;;
  stop) stop ;;
  start-node) running "$2" || launch "$2"; say "node $2 synced" ;;
  stop-node) stop_node "$2" ;;
  status)
    up=0
    for i in $(seq 1 "$NODES"); do running "$i" && synced "$i" && up=$((up + 1)); done
    echo "$up of $NODES node(s) synced; proxy 127.0.0.1:$PROXY_PORT"
    [ "$up" = "$NODES" ] ;;
  *) echo "usage: galera.sh start|stop|status|start-node <i>|stop-node <i>" >&2; exit 2 ;;
esac
