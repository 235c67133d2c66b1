#!/usr/bin/env bash
# Runs a command and starts it again whenever it exits on its own, saying so; gives up after 5 exits within a minute.
# SIGTERM/SIGINT stop it: the signal is passed to the command, which is then not restarted.
# Usage: supervise.sh <name> <command> [args...]
set -u
name=$1; shift
child=0
stopping=0
stop() {
  stopping=1
  # The job table, not $child: a signal can arrive between the fork and `child=$!`.
  local pids
  pids=$(jobs -p)
  [ -n "$pids" ] && kill -TERM $pids 2>/dev/null
  wait
  exit 0
}
trap stop TERM INT
exits=()
while :; do
  "$@" &
  child=$!
  wait "$child"
  rc=$?
  [ "$stopping" = 1 ] && exit 0
  now=$SECONDS
  recent=()
  for t in "${exits[@]}"; do [ $((now - t)) -lt 60 ] && recent+=("$t"); done
  exits=("${recent[@]}" "$now")
  if [ ${#exits[@]} -ge 5 ]; then
    echo "[start] the $name exited 5 times within a minute (last exit status $rc); not restarting it again" >&2
    exit 1
  fi
  echo "[start] the $name stopped unexpectedly (exit status $rc); starting it again" >&2
  sleep 1
done
