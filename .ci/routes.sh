#!/usr/bin/env bash
# routes.sh: the C ABI and HTTP routes. Installs gcc from apt when it is
# missing (cgo and the C test program need it), then runs the C interface
# test (builds libkeyloom.so with -buildmode=c-shared, compiles
# capi/test/klm_test.c against capi/keyloom.h, runs it) and the HTTP server
# tests, including the bounded loopback load test. Also compiles the
# benchmark once so it cannot quietly break.
set -euo pipefail
cd "$(dirname "$0")/.."
export GOFLAGS="${GOFLAGS:-} -mod=readonly"
export CGO_ENABLED=1

if ! command -v gcc >/dev/null 2>&1; then
  echo "== apt-get install gcc libc6-dev"
  export DEBIAN_FRONTEND=noninteractive
  if [ "$(id -u)" -eq 0 ]; then sudo=; else sudo=sudo; fi
  $sudo apt-get update -q
  $sudo apt-get install -y -q --no-install-recommends gcc libc6-dev
fi
echo "== gcc: $(gcc --version | head -1)"

echo "== C ABI and HTTP server tests"
go test -count=1 ./capi/ ./cmd/keyloom/ -run 'Serve|CAPI'
echo "== HTTP load benchmark once"
go test -run '^$' -bench 'ServeSuggest' -benchtime 1x ./cmd/keyloom/
echo "== routes ok"
