#!/usr/bin/env bash
# npm test: build the client (the browser tests serve it), then every vitest project against a throw-away
# PostgreSQL cluster on 127.0.0.1:55433 (started and destroyed by tests/setup/global-setup.ts).
# Writes .logs/vitest.json for .ci/run's count; its last lines are vitest's own summary.
set -uo pipefail
cd "$(dirname "$0")/.."
mkdir -p .logs
rm -f .logs/vitest.json
node node_modules/vite/bin/vite.js build --logLevel warn || exit 1
exec node node_modules/vitest/vitest.mjs run --reporter=default --reporter=json --outputFile.json=.logs/vitest.json "$@"
