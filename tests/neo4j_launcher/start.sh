#!/usr/bin/env bash
# Start a throwaway Neo4j Community server for the `-m neo4j` tests, in the background, on 127.0.0.1.
#   bash tests/neo4j_launcher/start.sh DIR      (DIR: a scratch folder; the database lives in DIR/home)
# Fetches Neo4j with Maven into the local repository (~/.m2, reused by later runs), builds the small launcher,
# starts it with a random password and a free port, waits until Bolt answers, and writes DIR/env:
#   export GRAFTWORK_TEST_NEO4J_URI=bolt://127.0.0.1:PORT GRAFTWORK_TEST_NEO4J_PASSWORD=...
# Stop it with: bash tests/neo4j_launcher/stop.sh DIR
set -euo pipefail
here="$(cd "$(dirname "$0")" && pwd)"
dir="$(mkdir -p "$1" && cd "$1" && pwd)"
python="${PYTHON:-python3}"

mvn -q -B -f "$here/pom.xml" compile dependency:build-classpath -Dmdep.outputFile=target/classpath.txt

port="$("$python" -c 'import socket; s = socket.socket(); s.bind(("127.0.0.1", 0)); print(s.getsockname()[1])')"
password="$("$python" -c 'import secrets; print(secrets.token_urlsafe(18))')"
rm -f "$dir/ready"
# The password goes through the environment, never the command line (visible in ps). Standard input is a stream
# of zeros that never ends, so only stop.sh (SIGTERM, a clean shutdown) stops it.
GRAFTWORK_TEST_NEO4J_PASSWORD="$password" nohup java -Xms256m -Xmx1g -XX:+UseSerialGC \
  -cp "$here/target/classes:$(cat "$here/target/classpath.txt")" \
  graftwork.testserver.TestServer "$dir/home" "$port" "$dir/ready" </dev/zero >"$dir/server.log" 2>&1 &
echo $! >"$dir/pid"

for _ in $(seq 1 300); do
  if [ -s "$dir/ready" ]; then
    umask 077
    printf 'export GRAFTWORK_TEST_NEO4J_URI=%q\nexport GRAFTWORK_TEST_NEO4J_USER=neo4j\nexport GRAFTWORK_TEST_NEO4J_PASSWORD=%q\n' \
      "$(cat "$dir/ready")" "$password" >"$dir/env"
    echo "test Neo4j ready at $(cat "$dir/ready") (pid $(cat "$dir/pid"), log $dir/server.log)"
    exit 0
  fi
  if ! kill -0 "$(cat "$dir/pid")" 2>/dev/null; then
    echo "test Neo4j exited before it was ready; its log:" >&2
    tail -n 40 "$dir/server.log" >&2
    exit 1
  fi
  sleep 1
done
echo "test Neo4j did not answer within 300 s; its log:" >&2
tail -n 40 "$dir/server.log" >&2
kill "$(cat "$dir/pid")" 2>/dev/null || true
exit 1
