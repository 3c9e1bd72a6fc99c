#!/usr/bin/env bash
# web.sh: the WebAssembly route's end-to-end test in headless Chromium.
# Installs what a fresh Debian machine lacks (Chromium from apt, Node.js and
# npm from apt if absent, playwright-core from web/package-lock.json) and then
# runs the Go test that builds the wasm engine, serves the page on 127.0.0.1
# and drives it (web/e2e_test.go, build tag "browser").
set -euo pipefail
cd "$(dirname "$0")/.."
export PLAYWRIGHT_SKIP_BROWSER_DOWNLOAD=1 # never fetch a browser build: Debian's chromium is used
export GOFLAGS="${GOFLAGS:-} -mod=readonly"

need=()
[ -x /usr/bin/chromium ] || need+=(chromium)
command -v node >/dev/null 2>&1 || need+=(nodejs)
command -v npm >/dev/null 2>&1 || need+=(npm)
if [ "${#need[@]}" -gt 0 ]; then
  echo "== apt-get install ${need[*]}"
  export DEBIAN_FRONTEND=noninteractive
  apt-get update -q
  apt-get install -y -q --no-install-recommends "${need[@]}"
fi
echo "== chromium: $(/usr/bin/chromium --version 2>/dev/null | head -1)"
echo "== node: $(node --version)"

echo "== npm ci (web/)"
(cd web && npm ci --no-audit --no-fund)

echo "== wasm bridge vet (the whole module's js/wasm build is in .ci/run)"
GOOS=js GOARCH=wasm go vet ./web/wasm

echo "== browser end-to-end test"
go vet -tags browser ./web/
go test -tags browser -count=1 -v ./web/
