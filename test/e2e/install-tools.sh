#!/usr/bin/env bash
# Installs what the editor end-to-end test needs, once per machine (about 2 minutes from bare):
# Debian's chromium (driven by playwright-core), libkrb5-dev and ripgrep (needed to build code-server
# from npm offline), neovim, code-server 4.100.3 (the last release for Node 20) and playwright-core.
# Everything goes under $E2E_WORK (default /tmp/trialbook-e2e); nothing is installed into the project.
# Recipe and pitfalls: ../shared/e2e/README.md of the workspace.
set -euo pipefail
WORK=${E2E_WORK:-/tmp/trialbook-e2e}
CS_VERSION=4.100.3
PW_VERSION=1.65.1
mkdir -p "$WORK"

export DEBIAN_FRONTEND=noninteractive
need=()
for p in libkrb5-dev ripgrep chromium neovim build-essential python3; do
  dpkg -s "$p" >/dev/null 2>&1 || need+=("$p")
done
if [ ${#need[@]} -gt 0 ]; then
  # The lock serialises apt between the processes that share this machine.
  flock /tmp/apt.lock apt-get update -qq
  flock /tmp/apt.lock apt-get install -y -qq --no-install-recommends "${need[@]}" >/dev/null
fi

# code-server pins @vscode/ripgrep 1.15.11, whose postinstall downloads rg from the internet; it looks
# in this cache first, so Debian's rg under the expected name keeps the install offline.
case "$(uname -m)" in
  x86_64) RG_TARGET=x86_64-unknown-linux-musl ;;
  aarch64) RG_TARGET=aarch64-unknown-linux-musl ;;
  *) echo "unsupported architecture $(uname -m)"; exit 1 ;;
esac
RG_CACHE="${TMPDIR:-/tmp}/vscode-ripgrep-cache-1.15.11"
if [ ! -f "$RG_CACHE/ripgrep-v13.0.0-10-$RG_TARGET.tar.gz" ]; then
  mkdir -p "$RG_CACHE/stage" && cp /usr/bin/rg "$RG_CACHE/stage/rg"
  tar -czf "$RG_CACHE/ripgrep-v13.0.0-10-$RG_TARGET.tar.gz" -C "$RG_CACHE/stage" rg
  rm -rf "$RG_CACHE/stage"
fi

if [ ! -x "$WORK/cs/node_modules/.bin/code-server" ]; then
  mkdir -p "$WORK/cs"
  echo '{ "name": "cs-host", "private": true, "allowScripts": { "code-server": true, "argon2": true } }' > "$WORK/cs/package.json"
  # unsafe_perm: code-server's postinstall refuses root without it; yes: node-pty runs `npx node-gyp`.
  (cd "$WORK/cs" && npm_config_unsafe_perm=true npm_config_yes=true \
     npm install --no-audit --no-fund --loglevel=error "code-server@$CS_VERSION" > "$WORK/cs-install.log" 2>&1) \
    || { tail -60 "$WORK/cs-install.log"; exit 1; }
fi

if [ ! -d "$WORK/driver/node_modules/playwright-core" ]; then
  mkdir -p "$WORK/driver"
  echo '{ "name": "driver", "private": true }' > "$WORK/driver/package.json"
  (cd "$WORK/driver" && npm install --no-audit --no-fund --loglevel=error "playwright-core@$PW_VERSION")
fi
echo "e2e tools ready in $WORK"
