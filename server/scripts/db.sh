#!/usr/bin/env bash
# Private MariaDB for Brightward: its own data dir, socket, pid file and port on 127.0.0.1.
# Usage: db.sh ensure|start|stop|status|ensure-chromium|ensure-poppler|ensure-nats|ensure-haproxy|ensure-galera|ensure-rsync
#   BW_DB_DIR   data folder (default .data/mariadb)      BW_DB_PORT  port (default 3307)
#   BW_DB_NAME  database (default brightward)             BW_DB_USER / BW_DB_PASSWORD  app account
#   BW_DB_SUPER set to 1 to grant the app account every privilege (throwaway test servers only)
set -euo pipefail
cd "$(dirname "$0")/../.."
ROOT=$PWD
DB_DIR=${BW_DB_DIR:-$ROOT/.data/mariadb}
case "$DB_DIR" in /*) ;; *) DB_DIR=$ROOT/$DB_DIR ;; esac
PORT=${BW_DB_PORT:-3307}
NAME=${BW_DB_NAME:-brightward}
USER_NAME=${BW_DB_USER:-brightward}
PASSWORD=${BW_DB_PASSWORD:-brightward-local}
DATA=$DB_DIR/data
SOCK=$DB_DIR/mysqld.sock
PIDF=$DB_DIR/mysqld.pid
LOG=$DB_DIR/mysqld.err

say() { echo "[db] $*" >&2; }

# Installs a Debian package when its command is missing: only as root with apt-get; otherwise says what to install.
ensure_package() { # command package
  command -v "$1" >/dev/null 2>&1 && return 0
  [ -x "/usr/sbin/$1" ] && return 0
  if [ "$(id -u)" != 0 ] || ! command -v apt-get >/dev/null 2>&1; then
    say "'$1' is not installed. Install the Debian/Ubuntu package '$2' (e.g. sudo apt-get install $2) and run again."
    exit 1
  fi
  # Refresh the package lists when they are missing or older than a day.
  if [ -z "$(find /var/lib/apt/lists -maxdepth 1 -name '*Packages*' -mtime -1 2>/dev/null | head -1)" ]; then
    say "apt-get update (package lists missing or stale)"
    apt-get update -qq >&2
  fi
  say "installing $2 from Debian's packages"
  DEBIAN_FRONTEND=noninteractive apt-get install -y -qq --no-install-recommends "$2" >&2
}

running() { [ -f "$PIDF" ] && kill -0 "$(cat "$PIDF")" 2>/dev/null; }

bin() { command -v "$1" 2>/dev/null || echo "/usr/sbin/$1"; }

start() {
  ensure_package mariadbd mariadb-server
  mkdir -p "$DB_DIR"
  if running; then say "already running on 127.0.0.1:$PORT (pid $(cat "$PIDF"))"; else
    if [ ! -d "$DATA/mysql" ]; then
      say "creating data dir $DATA"
      rm -rf "$DATA"
      "$(bin mariadb-install-db)" --no-defaults --datadir="$DATA" --user=root --auth-root-authentication-method=socket \
        --skip-test-db --skip-name-resolve >"$DB_DIR/install.log" 2>&1 || { cat "$DB_DIR/install.log" >&2; exit 1; }
    fi
    "$(bin mariadbd)" --no-defaults --datadir="$DATA" --user=root --bind-address=127.0.0.1 --port="$PORT" \
      --socket="$SOCK" --pid-file="$PIDF" --log-error="$LOG" --skip-name-resolve \
      --innodb-buffer-pool-size=1G --innodb-log-file-size=512M \
      --character-set-server=utf8mb4 --collation-server=utf8mb4_unicode_ci >/dev/null 2>&1 &
    for _ in $(seq 1 300); do
      "$(bin mariadb-admin)" --no-defaults --protocol=socket --socket="$SOCK" -uroot ping >/dev/null 2>&1 && break
      sleep 0.1
    done
    "$(bin mariadb-admin)" --no-defaults --protocol=socket --socket="$SOCK" -uroot ping >/dev/null 2>&1 || {
      say "MariaDB did not start; last lines of $LOG:"; tail -20 "$LOG" >&2; exit 1; }
    say "MariaDB ready on 127.0.0.1:$PORT (data $DATA)"
  fi
  local grant="GRANT ALL PRIVILEGES ON \`$NAME\`.* TO '$USER_NAME'@'127.0.0.1';"
  [ "${BW_DB_SUPER:-0}" = 1 ] && grant="GRANT ALL PRIVILEGES ON *.* TO '$USER_NAME'@'127.0.0.1' WITH GRANT OPTION;"
  "$(bin mariadb)" --no-defaults --protocol=socket --socket="$SOCK" -uroot <<SQL
CREATE DATABASE IF NOT EXISTS \`$NAME\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci;
CREATE USER IF NOT EXISTS '$USER_NAME'@'127.0.0.1' IDENTIFIED BY '$PASSWORD';
ALTER USER '$USER_NAME'@'127.0.0.1' IDENTIFIED BY '$PASSWORD';
$grant
SQL
}

stop() {
  if ! running; then say "not running"; return 0; fi
  local pid; pid=$(cat "$PIDF")
  kill -TERM "$pid"
  for _ in $(seq 1 300); do kill -0 "$pid" 2>/dev/null || break; sleep 0.1; done
  if kill -0 "$pid" 2>/dev/null; then say "MariaDB (pid $pid) did not stop within 30 s"; exit 1; fi
  say "MariaDB stopped"
}

case "${1:-}" in
  ensure) ensure_package mariadbd mariadb-server ;;
  start) start ;;
  stop) stop ;;
  status) if running; then echo "running on 127.0.0.1:$PORT (pid $(cat "$PIDF"))"; else echo "stopped"; exit 1; fi ;;
  ensure-chromium) ensure_package chromium chromium ;;
  ensure-poppler) ensure_package pdftotext poppler-utils ;;
  ensure-nats) ensure_package nats-server nats-server ;;
  ensure-haproxy) ensure_package haproxy haproxy ;;
  ensure-galera) [ -f /usr/lib/galera/libgalera_smm.so ] || ensure_package libgalera_smm.so galera-4 ;;
  ensure-rsync) ensure_package rsync rsync ;;
  *) echo "usage: db.sh ensure|start|stop|status|ensure-chromium|ensure-poppler|ensure-nats|ensure-haproxy|ensure-galera|ensure-rsync" >&2; exit 2 ;;
esac
