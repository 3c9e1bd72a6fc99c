#!/usr/bin/env bash
# CI step for the terminal playground (keyloom type): installs tmux when it is
# missing, so that the test driving the real binary in a terminal runs for real.
set -euo pipefail
cd "$(dirname "$0")/.."
if ! command -v tmux >/dev/null 2>&1; then
	sudo=""
	if [ "$(id -u)" -ne 0 ]; then sudo="sudo"; fi
	$sudo apt-get update
	$sudo apt-get install -y tmux
fi
go test -count=1 ./cmd/keyloom/ -run Type
