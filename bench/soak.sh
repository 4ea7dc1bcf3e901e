#!/usr/bin/env bash
# Soak test of the HTTP service on loopback, bounded in count and time.
#
# Starts target/wayhold.jar (built when missing) on a free loopback port with a write token, then holds
# N vehicles posting M times per second (each post carries the next 1/M s of a recorded demo drive, so
# every vehicle streams in real time x SPEED) while D dashboards poll poses, for T minutes. Reports
# accepted samples, errors, latency p50/p99 and the server's heap after a full GC at start and end.
#
# With -k S the server is killed with SIGKILL every S seconds and started again on the same --data
# directory (by bench/Soak.java, which then checks that every vehicle holds exactly the samples its
# acknowledged replies applied, plus at most those of requests whose reply never came, and reads the heap
# after a full GC at the start, before every kill and at the end).
#
# Usage: bench/soak.sh [-n N=50] [-m M=5] [-t T_MINUTES=2] [-d D=4] [-s SPEED=1] [-x XMX=512m] [-k S]
# Bounds: N <= 500, M <= 50, T <= 30 min, D <= 100, SPEED <= 100, S >= 10. Needs a JDK (jcmd) on PATH.
set -euo pipefail
cd "$(dirname "$0")/.."

N=50; M=5; T=2; D=4; SPEED=1; XMX=512m; KILL=0
while getopts "n:m:t:d:s:x:k:" opt; do
  case $opt in
    n) N=$OPTARG ;; m) M=$OPTARG ;; t) T=$OPTARG ;; d) D=$OPTARG ;; s) SPEED=$OPTARG ;; x) XMX=$OPTARG ;;
    k) KILL=$OPTARG ;;
    *) sed -n '2,17p' "$0"; exit 2 ;;
  esac
done
if [[ "$KILL" != 0 ]] && (( KILL < 10 )); then
  echo "-k: at least 10 s between kills, was $KILL" >&2; exit 2
fi

LOG=sample-logs/two-tunnels.ndjson.gz
if [[ ! -f target/wayhold.jar ]]; then
  mvn -B -ntp -o -q -DskipTests package
fi

WORK=$(mktemp -d)
PORT=$(python3 -c 'import socket; s=socket.socket(); s.bind(("127.0.0.1", 0)); print(s.getsockname()[1])')
TOKEN="soak-$(head -c 18 /dev/urandom | base64 | tr -dc 'A-Za-z0-9')"
DATA_ARGS=()
if java -jar target/wayhold.jar serve --help 2>/dev/null | grep -q -- '--data'; then
  DATA_ARGS=(--data "$WORK/data")
fi

if [[ "$KILL" != 0 ]]; then
  trap 'rm -rf "$WORK"' EXIT
  printf '%s\n' java -Xmx"$XMX" -jar target/wayhold.jar serve --config "$WORK/none.yaml" --bind 127.0.0.1 \
    --port "$PORT" --data "$WORK/data" >"$WORK/server.cmd"
  START=$(date +%s)
  WAYHOLD_WRITE_TOKENS="$TOKEN" SOAK_KILL_EVERY_S="$KILL" SOAK_SERVER_CMD="$WORK/server.cmd" \
    SOAK_SERVER_LOG="$WORK/server.out" java bench/Soak.java "http://127.0.0.1:$PORT" "$LOG" "$N" "$M" "$T" "$D" \
    "$SPEED" "$TOKEN" | tee "$WORK/client.out"
  echo "wall_s $(( $(date +%s) - START ))"
  echo "journal_bytes_on_disk $(du -sb "$WORK/data" | cut -f1)"
  echo "server_starts $(grep -c 'wayhold serving on' "$WORK/server.out")"
  echo "server_log_errors $(grep -c -E 'Exception|ERROR' "$WORK/server.out" || true)"
  grep -m 5 -E 'Exception|ERROR|LOST|QUARANTINED' "$WORK/server.out" || true
  exit 0
fi

WAYHOLD_WRITE_TOKENS="$TOKEN" java -Xmx"$XMX" -jar target/wayhold.jar serve --config "$WORK/none.yaml" \
  --bind 127.0.0.1 --port "$PORT" "${DATA_ARGS[@]}" >"$WORK/server.out" 2>&1 &
PID=$!
cleanup() { kill "$PID" 2>/dev/null || true; wait "$PID" 2>/dev/null || true; rm -rf "$WORK"; }
trap cleanup EXIT

for _ in $(seq 1 100); do
  curl -fsS "http://127.0.0.1:$PORT/health" >/dev/null 2>&1 && break
  sleep 0.1
done

heap_after_gc() {
  jcmd "$PID" GC.run >/dev/null
  # "def new generation total 157248K, used 5592K" / "tenured generation total ..., used ...K" / G1 "garbage-first heap total ..., used ...K"
  jcmd "$PID" GC.heap_info | awk '/used/ { for (i = 1; i <= NF; i++) if ($i == "used") { v = $(i+1); sub(/K,?$/, "", v); sum += v } }
    /Metaspace/ { exit } END { printf "%.1f", sum / 1024 }'
}
rss_mib() { awk '/VmRSS/ { printf "%.1f", $2 / 1024 }' "/proc/$PID/status"; }

HEAP0=$(heap_after_gc)
START=$(date +%s)
java bench/Soak.java "http://127.0.0.1:$PORT" "$LOG" "$N" "$M" "$T" "$D" "$SPEED" "$TOKEN" | tee "$WORK/client.out"
END=$(date +%s)
HEAP1=$(heap_after_gc)
SESSIONS=$(curl -fsS "http://127.0.0.1:$PORT/health" | sed -n 's/.*"sessions":\([0-9]*\).*/\1/p')
echo "wall_s $((END - START))"
echo "server_sessions $SESSIONS"
echo "heap_after_gc_mib start $HEAP0 end $HEAP1 (max $XMX)"
echo "server_rss_mib $(rss_mib)"
echo "largest wayhold classes after GC (instances, bytes):"
jcmd "$PID" GC.class_histogram | awk '/org\.wayhold\./ && n < 6 { printf "  %s %s %s\n", $4, $2, $3; n++ }'
if grep -q -E 'Exception|ERROR' "$WORK/server.out"; then
  echo "server_log_errors $(grep -c -E 'Exception|ERROR' "$WORK/server.out")"
  grep -m 5 -E 'Exception|ERROR' "$WORK/server.out"
else
  echo "server_log_errors 0"
fi
