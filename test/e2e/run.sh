#!/usr/bin/env bash
# `npm run e2e`: installs the editor test tools once (test/e2e/install-tools.sh), packages the
# extension (`npm run package`), and runs the code-server test. Not part of `npm test`: it needs apt
# packages and about two minutes of installs on a bare machine. Screenshots: test/e2e/screenshots/.
set -euo pipefail
ROOT=$(cd "$(dirname "$0")/../.." && pwd)
bash "$ROOT/test/e2e/install-tools.sh"
(cd "$ROOT" && npm run package --silent)
node "$ROOT/test/e2e/code-server.e2e.cjs"
