#!/usr/bin/env bash
# Health of a running wayhold service: GET /health on loopback must answer 200, which it does while the
# service takes writes (readiness); it answers 503 while the journal cannot write (a full disk), and
# becomes ready again by itself once it can. A 200 with "status":"degraded" (records lost at the last
# start, a quarantined vehicle, failing snapshots) is healthy but needs a person: its "problems" say why.
# Needs only bash and coreutils, so it runs in a JRE image without curl. The port is WAYHOLD_PORT,
# default 8470.
set -euo pipefail
port="${WAYHOLD_PORT:-8470}"
exec 3<>"/dev/tcp/127.0.0.1/${port}"
printf 'GET /health HTTP/1.1\r\nHost: 127.0.0.1\r\nConnection: close\r\n\r\n' >&3
reply="$(timeout 5 cat <&3)"
exec 3<&-
[[ "${reply}" == "HTTP/1.1 200"* && "${reply}" == *'"ready":true'* ]]
