#!/usr/bin/env bash
# How far to trust a pose: prints the honesty and drift figures of the filter
#  - on the real drives in ../shared/real-drives (skipped with a message when absent), and
#  - on each simulated sensor effect of `simulate` plus the combined city drive, over SEEDS seeds.
# Usage: bench/accuracy-study.sh [SEEDS] [MINUTES] [CONFIG.yaml]
# Defaults: 5 seeds of 15-minute drives (effects that need longer drives get them), built-in defaults.
# Takes a minute or two on 2 cores with the defaults.
set -euo pipefail
cd "$(dirname "$0")/.."
SEEDS="${1:-5}"
MINUTES="${2:-15}"
CONFIG="${3:-}"
mvn -B -ntp -q test-compile dependency:build-classpath -Dmdep.outputFile=target/study-cp.txt
CP="target/classes:target/test-classes:$(cat target/study-cp.txt)"
echo "== real drives"
java -cp "$CP" org.wayhold.accuracy.HonestyStudyMain ${CONFIG:+"$CONFIG"}
echo "== simulated effects ($SEEDS seeds, $MINUTES min)"
if [ -n "$CONFIG" ]; then
  java -cp "$CP" org.wayhold.accuracy.EffectStudyMain "$SEEDS" "$MINUTES" "$CONFIG"
else
  java -cp "$CP" org.wayhold.accuracy.EffectStudyMain "$SEEDS" "$MINUTES"
fi
