#!/bin/sh
# fuzz.sh PACKAGE TARGET: runs one Go fuzz target for $FUZZTIME. Go's fuzzing
# engine can end with a bare "context deadline exceeded" when the time runs
# out while it is minimising a newly interesting input; no failing input is
# written then, so the run is repeated, up to twice. Any other failure fails.
set -u
GO=${GO:-go}
out=$(mktemp)
for try in 1 2 3; do
	if "$GO" test -run '^$' -fuzz "^$2\$" -fuzztime "${FUZZTIME:-8s}" "$1" >"$out" 2>&1; then
		cat "$out"; rm -f "$out"; exit 0
	fi
	cat "$out"
	if grep -q "Failing input written" "$out" || ! grep -q "context deadline exceeded" "$out" || [ "$try" = 3 ]; then
		rm -f "$out"; exit 1
	fi
	echo "fuzz.sh: $2 stopped at its deadline without a failing input; running it again"
done
