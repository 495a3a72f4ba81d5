#!/usr/bin/env bash
# `npm run e2e` (also `npm run test:e2e`): installs the editor test tools once
# (test/e2e/install-tools.sh), packages the extension (`npm run package`), then runs
#   1. the code-server test: the .vsix in a real VS Code build, driven by headless Chromium;
#   2. the Neovim test: the bundled server through Neovim's built-in LSP client, headless.
# Not part of `npm test`: it needs apt packages and about two minutes of installs on a bare machine.
# Screenshots: test/e2e/screenshots/ (SHOT_DIR overrides).
set -uo pipefail
ROOT=$(cd "$(dirname "$0")/../.." && pwd)
bash "$ROOT/test/e2e/install-tools.sh" || exit 1
(cd "$ROOT" && npm run package --silent) || exit 1
pass=0; fail=0
# A browser-driven UI can miss one event under load; a second full attempt tells a flake from a failure
# (both attempts must fail for the suite to fail, and the first failure's screenshot is kept).
if node "$ROOT/test/e2e/code-server.e2e.cjs"; then pass=$((pass + 1));
elif echo "code-server e2e failed once; retrying from a fresh editor" && node "$ROOT/test/e2e/code-server.e2e.cjs"; then pass=$((pass + 1));
else fail=$((fail + 1)); fi
if (cd "$ROOT" && TRIALBOOK_SERVER=dist/server.cjs nvim --headless -u NONE -c 'luafile test/e2e/nvim-lsp.e2e.lua'); then
  pass=$((pass + 1)); else fail=$((fail + 1)); fi
echo "editor e2e: $pass passed, $fail failed"
[ "$fail" -eq 0 ]
