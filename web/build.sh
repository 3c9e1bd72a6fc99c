#!/usr/bin/env bash
# build.sh builds the Keyloom Notes page: web/dist/ (or the directory given as
# the first argument) receives main.wasm, the Go runtime glue wasm_exec.js
# from this Go installation, the static page and the demo model.
set -euo pipefail
web="$(cd "$(dirname "$0")" && pwd)"
root="$(dirname "$web")"
out="${1:-$web/dist}"
mkdir -p "$out"
out="$(cd "$out" && pwd)"

(cd "$root" && GOOS=js GOARCH=wasm go build -trimpath -ldflags=-s -o "$out/main.wasm" ./web/wasm)
glue="$(go env GOROOT)/lib/wasm/wasm_exec.js"
[ -f "$glue" ] || glue="$(go env GOROOT)/misc/wasm/wasm_exec.js" # Go before 1.24
cp "$glue" "$out/wasm_exec.js"
cp "$web"/static/*.html "$web"/static/*.css "$web"/static/*.js "$out/"
cp "$root/testdata/models/demo-v1.klm" "$out/demo-v1.klm"
echo "build.sh: page in $out"
