#!/usr/bin/env bash
# fuzz.sh runs every fuzz target of partsieve for FUZZTIME each (default
# 60s). Usage, from anywhere in the repository:
#
#   scripts/fuzz.sh                     # every target in every package
#   scripts/fuzz.sh ./importers/...     # the targets of some packages
#   FUZZTIME=10s FUZZ_MATCH=Mapping scripts/fuzz.sh   # targets matching a regexp
#
# A failing input is written by go test under the package's
# testdata/fuzz/<Target>/ directory, where it stays as a regression seed
# (plain `go test` replays it). The script lists the new files and exits 1
# when any target failed, 0 otherwise.
set -u -o pipefail
cd "$(dirname "$0")/.." || exit 2
fuzztime=${FUZZTIME:-60s}
match=${FUZZ_MATCH:-.}
pkgs=("$@")
[ ${#pkgs[@]} -eq 0 ] && pkgs=(./...)

# corpus files before the run, to tell the new ones apart
before=$(mktemp)
trap 'rm -f "$before"' EXIT
find . -path '*/testdata/fuzz/*' -type f | sort >"$before"

failed=()
ran=0
for pkg in $(go list "${pkgs[@]}"); do
	dir=$(go list -f '{{.Dir}}' "$pkg")
	targets=$(cd "$dir" && go test -list '^Fuzz' . 2>/dev/null | grep '^Fuzz' | grep -E -- "$match")
	for t in $targets; do
		ran=$((ran + 1))
		echo "=== $pkg $t (${fuzztime})"
		if ! (cd "$dir" && go test -run='^$' -fuzz="^${t}\$" -fuzztime="$fuzztime" . 2>&1 | tail -n 25); then
			failed+=("$pkg $t")
		fi
	done
done

# a failing go test also leaves a new
# corpus file: count those as failures too.
new=$(find . -path '*/testdata/fuzz/*' -type f | sort | comm -13 "$before" -)
if [ -n "$new" ]; then
	echo
	echo "new failing inputs (kept as regression seeds; commit them with the fix):"
	echo "$new"
fi
echo
echo "fuzz.sh: $ran targets, ${#failed[@]} failed"
for f in "${failed[@]}"; do echo "FAILED: $f"; done
[ ${#failed[@]} -eq 0 ] && [ -z "$new" ]
