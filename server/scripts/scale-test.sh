#!/usr/bin/env bash
# `npm run test:scale`: the scaled-out product on loopback — a 3-node Galera cluster behind haproxy (galera.sh) — and
# the suites in test/scale (about 2 min; not part of `npm test`). Stops what it started.
#   BW_SCALE_DB_PORT   first Galera node's port (default 3331; 3 nodes use +0..+2)   BW_SCALE_PROXY_PORT (default 3330)
#   BW_SCALE_WSREP_PORT Galera replication ports (default 14667)                      BW_SCALE_DIR (default .data/scale)
set -uo pipefail
cd "$(dirname "$0")/../.."
DIR=${BW_SCALE_DIR:-.data/scale}
export BW_GALERA_DIR=$DIR/galera BW_GALERA_NODES=3
export BW_GALERA_PORT=${BW_SCALE_DB_PORT:-3331} BW_GALERA_PROXY_PORT=${BW_SCALE_PROXY_PORT:-3330}
export BW_GALERA_WSREP_PORT=${BW_SCALE_WSREP_PORT:-14667}
export BW_DB_HOST=127.0.0.1 BW_DB_PORT=$BW_GALERA_PROXY_PORT
export BW_DB_NAME=bw_test BW_DB_USER=bw_test BW_DB_PASSWORD=bw-test-only BW_DB_SUPER=1
export BW_LOG_LEVEL=${BW_LOG_LEVEL:-silent}
cleanup() { bash server/scripts/galera.sh stop; }
trap cleanup EXIT
trap 'exit 130' INT TERM
bash server/scripts/galera.sh start || exit 1
npx vitest run --config test/scale/vitest.config.ts "$@"
