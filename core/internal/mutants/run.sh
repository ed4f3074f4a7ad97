#!/usr/bin/env bash
# Mutation check of the measurement code (make mutants; not part of make test).
#
# Each mutant in mutants.txt is one small change to the source (drop a
# correction, change a window or a constant, swap sagittal and tangential,
# ...). For each, a temporary copy of the module gets that one change and the
# tests of the named packages run with -short. A mutant the tests catch is
# "killed"; one they miss "survived": it needs a test, or a reason why it
# cannot matter (see the comment above it in mutants.txt).
#
# Usage: core/internal/mutants/run.sh [NAME-PATTERN]
# MUTANTS_RUN=REGEXP limits the tests run (go test -run), e.g. to see which
# mutants one test catches alone.
set -u -o pipefail
here=$(cd "$(dirname "$0")" && pwd)
root=$(cd "$here/../../.." && pwd)
list="$here/mutants.txt"
pattern=${1:-.}
work=$(mktemp -d "${TMPDIR:-/tmp}/sagitta-mutants.XXXXXX")
trap 'rm -rf "$work"' EXIT
(cd "$root" && tar -cf - go.mod go.sum core testdata) | (cd "$work" && tar -xf -)
list="$work/core/internal/mutants/mutants.txt" # the copy: edits while it runs do not matter

killed=0 survived=0 broken=0
survivors=()
name= file= pkgs= old= new=
run_one() {
	[ -n "$name" ] || return 0
	if ! [[ "$name" =~ $pattern ]]; then name=; return 0; fi
	local f="$work/$file"
	cp "$f" "$f.orig"
	if ! OLD="$old" NEW="$new" perl -0777 -pi -e '
		my $n = () = /\Q$ENV{OLD}\E/g;
		die "found $n times\n" if $n != 1;
		s/\Q$ENV{OLD}\E/$ENV{NEW}/;' "$f" 2>"$work/err"; then
		echo "BROKEN    $name: the text to change is $(cat "$work/err")"
		broken=$((broken + 1))
	elif ! (cd "$work" && go vet $pkgs >"$work/out" 2>&1); then
		echo "BROKEN    $name: does not build"
		broken=$((broken + 1))
	elif (cd "$work" && go test -short -count=1 ${MUTANTS_RUN:+-run "$MUTANTS_RUN"} $pkgs >"$work/out" 2>&1); then
		echo "SURVIVED  $name"
		survived=$((survived + 1))
		survivors+=("$name")
	else
		echo "killed    $name ($(grep -m1 -- '--- FAIL' "$work/out" | sed 's/--- FAIL: //; s/ (.*//'))"
		killed=$((killed + 1))
	fi
	mv "$f.orig" "$f"
	name=
}
while IFS= read -r line || [ -n "$line" ]; do
	case "$line" in
	'#'* | '') continue ;;
	'name: '*) run_one; name=${line#name: } ;;
	'file: '*) file=${line#file: } ;;
	'pkgs: '*) pkgs=${line#pkgs: } ;;
	'old: '*) printf -v old '%b' "${line#old: }" ;;
	'new: '*) printf -v new '%b' "${line#new: }" ;;
	*) echo "mutants.txt: cannot read: $line" >&2; exit 2 ;;
	esac
done <"$list"
run_one
echo "mutants: $killed killed, $survived survived, $broken broken"
for s in "${survivors[@]}"; do echo "  survivor: $s"; done
[ "$broken" -eq 0 ]
