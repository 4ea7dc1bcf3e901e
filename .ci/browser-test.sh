#!/usr/bin/env bash
# The live view (/): first the unit tests of its page-free modules under Node (e2e/modules.test.mjs),
# then the end-to-end check in a real browser: Debian's headless Chromium driven by playwright-core
# from npm (no browser download). Starts the service jar with a replay of
# sample-logs/two-tunnels.ndjson.gz at 20x and checks the page against it, then a fleet and read
# tokens; see e2e/view.e2e.mjs. Then the drift report of two demo drives in the same browser
# (e2e/report.e2e.mjs). Screenshots go to target/e2e/. The live view's last line is "e2e: N passed, N
# failed", the report's "report e2e: N passed, N failed"; the script fails when either failed.
# Needs: Java 17, Node.js 20+, npm; installs Chromium with apt-get when it is missing (as root).
set -euo pipefail
cd "$(dirname "$0")/.."

CHROMIUM="${CHROMIUM:-/usr/bin/chromium}"
if [ ! -x "$CHROMIUM" ]; then
  if [ "$(id -u)" -ne 0 ]; then
    echo "browser-test: $CHROMIUM is missing and installing it needs root (apt-get install chromium)" >&2
    exit 1
  fi
  apt-get update
  DEBIAN_FRONTEND=noninteractive apt-get install -y chromium
fi

if [ ! -f target/wayhold.jar ]; then
  mvn -B -ntp -DskipTests package
fi

(cd e2e && npm ci --no-audit --no-fund)

node --test e2e/modules.test.mjs

mkdir -p target/e2e
status=0
CHROMIUM="$CHROMIUM" node e2e/view.e2e.mjs --jar target/wayhold.jar \
  --replay sample-logs/two-tunnels.ndjson.gz --speed 20 --out target/e2e || status=1
CHROMIUM="$CHROMIUM" node e2e/report.e2e.mjs --jar target/wayhold.jar --out target/e2e || status=1
exit $status
