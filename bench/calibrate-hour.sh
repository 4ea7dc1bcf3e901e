#!/usr/bin/env bash
# Times `wayhold calibrate` on a one-hour simulated drive, pinned to one core (taskset) with a JVM told it
# has one processor, as a user runs it: a fresh JVM, JIT warm-up included. Not run by the tests.
# Usage: bash bench/calibrate-hour.sh [seed]
set -euo pipefail
cd "$(dirname "$0")/.."
JAR=target/wayhold.jar
[ -f "$JAR" ] || mvn -B -ntp -q -DskipTests package
SEED=${1:-11}
WORK=$(mktemp -d)
trap 'rm -rf "$WORK"' EXIT
# A vehicle unlike the defaults: 0.12 s latency, antenna 1.2 m behind and 0.4 m left, +1.2 % gyro scale.
java -jar "$JAR" simulate --minutes 60 --seed "$SEED" --latency --latency-s 0.12 --lever-arm-m -1.2,0.4 \
    --gyro-scale --gyro-scale-pct 1.2 --out "$WORK/hour.ndjson.gz" >/dev/null
echo "load average before: $(cut -d' ' -f1-3 /proc/loadavg)"
start=$(date +%s.%N)
taskset -c 0 java -XX:ActiveProcessorCount=1 -jar "$JAR" calibrate "$WORK/hour.ndjson.gz" --out "$WORK/hour.yaml"
end=$(date +%s.%N)
echo "calibrate, one-hour drive, one core: $(echo "$end - $start" | bc) s wall"
sed -n '/^Estimates/,/^calibration took/p' "$WORK/hour.report.txt"
