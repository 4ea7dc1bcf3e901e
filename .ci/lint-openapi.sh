#!/usr/bin/env bash
# Lints openapi.yaml with a real OpenAPI validator (rules in redocly.yaml). Exits non-zero on any error.
# @redocly/cli 2.77.0 is the last release that runs on Node 20.
set -euo pipefail
cd "$(dirname "$0")/.."
npx --yes @redocly/cli@2.77.0 lint openapi.yaml
