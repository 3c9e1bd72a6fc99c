#!/usr/bin/env bash
# Regenerates the Opticks split and every reference output in this directory.
# Needs python3 (standard library only) and the go command (for GOROOT).
set -euo pipefail
here="$(cd "$(dirname "$0")" && pwd)"
testdata="$(dirname "$here")"
source_txt="$(go env GOROOT)/src/testdata/Isaac.Newton-Opticks.txt"

python3 "$here/prepare.py" "$source_txt" "$testdata/opticks-train.txt" "$testdata/opticks-test.txt"
for n in 2 3 4; do
	python3 "$here/mkn.py" "$n" "$testdata/opticks-train.txt" "$testdata/opticks-test.txt" \
		>"$here/opticks-order$n.json"
done
python3 "$here/mkn.py" 3 "$here/toy-train.txt" "$here/toy-test.txt" >"$here/toy-order3.json"
echo "reference outputs written to $here" >&2
