#!/usr/bin/env bash
# Stop the test Neo4j server started by start.sh DIR (by the pid it recorded) and wait for a clean shutdown.
set -uo pipefail
dir="$1"
[ -s "$dir/pid" ] || exit 0
pid="$(cat "$dir/pid")"
kill "$pid" 2>/dev/null || exit 0
for _ in $(seq 1 60); do
  kill -0 "$pid" 2>/dev/null || { rm -f "$dir/pid"; exit 0; }
  sleep 1
done
kill -9 "$pid" 2>/dev/null
rm -f "$dir/pid"
