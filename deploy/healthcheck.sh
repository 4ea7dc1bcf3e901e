#!/usr/bin/env bash
# Health of a running wayhold service: GET /health on loopback must answer 200 with "status":"ok"
# ("degraded" means the journal cannot write and samples are refused). Needs only bash and coreutils,
# so it runs in a JRE image without curl. The port is WAYHOLD_PORT, default 8470.
set -euo pipefail
port="${WAYHOLD_PORT:-8470}"
exec 3<>"/dev/tcp/127.0.0.1/${port}"
printf 'GET /health HTTP/1.1\r\nHost: 127.0.0.1\r\nConnection: close\r\n\r\n' >&3
reply="$(timeout 5 cat <&3)"
exec 3<&-
[[ "${reply}" == "HTTP/1.1 200"* && "${reply}" == *'"status":"ok"'* ]]
