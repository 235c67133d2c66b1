#!/usr/bin/env bash
# Runs a command against a private benchmark MariaDB (own data dir and port), started and stopped around it.
set -uo pipefail
cd "$(dirname "$0")/../.."
export BW_DB_DIR=${BW_BENCH_DB_DIR:-.data/mariadb-bench}
export BW_DB_PORT=${BW_BENCH_DB_PORT:-3309}
export BW_DB_NAME=bw_bench BW_DB_USER=bw_bench BW_DB_PASSWORD=bw-bench-only BW_DB_SUPER=1
started=0
bash server/scripts/db.sh status >/dev/null 2>&1 || started=1
bash server/scripts/db.sh start >&2 || exit 1
"$@"
rc=$?
[ "$started" = 1 ] && bash server/scripts/db.sh stop >&2
exit $rc
