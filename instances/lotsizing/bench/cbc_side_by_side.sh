#!/bin/sh
# Side-by-side run of pincer and CBC (the Debian coinor-cbc package, used
# here only as a reference oracle) on lot-sizing files: pincer solves each
# file for the same wall time that CBC gets on the exported MPS model
# (CBC in elapsed-time mode, 2 threads; pincer with its default 2 workers).
#
# usage: cbc_side_by_side.sh PINCER SECONDS FILE...
# prints: file, pincer plan, pincer bound, CBC value, CBC bound, CBC status,
# and which plan is better; the last line counts the files where pincer's
# plan is better. Skips (exit 0) when cbc is not installed.
set -eu
pincer=$1; secs=$2; shift 2
if ! command -v cbc >/dev/null 2>&1; then
	echo "cbc not installed: skipped" >&2
	exit 0
fi
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
better=0; worse=0; ties=0; total=0
printf '%-10s %12s %12s %12s %12s %-8s %s\n' file pincer_plan pincer_bound cbc_value cbc_bound cbc pincer_vs_cbc
for f in "$@"; do
	b=$(basename "$f")
	"$pincer" solve --format lotsizing-ttm --time "${secs}s" --quiet --report "$tmp/$b.json" "$f" >/dev/null 2>&1 || true
	"$pincer" export mps --format lotsizing-ttm -o "$tmp/$b.mps" "$f"
	cbc "$tmp/$b.mps" -timeMode elapsed -sec "$secs" -threads 2 -solve -quit >"$tmp/$b.cbc" 2>&1 || true
	pv=$(sed -n 's/^  "plan_value": \([^,]*\),$/\1/p' "$tmp/$b.json")
	pb=$(sed -n 's/^  "bound": \([^,]*\),$/\1/p' "$tmp/$b.json")
	cv=$(sed -n 's/^Objective value: *\([^ ]*\).*/\1/p' "$tmp/$b.cbc" | head -n 1)
	cb=$(sed -n 's/^Lower bound: *\([^ ]*\).*/\1/p' "$tmp/$b.cbc" | head -n 1)
	if grep -q "Optimal solution found" "$tmp/$b.cbc"; then cs=optimal; cb=${cb:-$cv};
	elif grep -q "infeasible" "$tmp/$b.cbc"; then cs=infeasible;
	elif [ -n "$cv" ]; then cs=stopped; else cs=none; fi
	verdict=$(awk -v p="${pv:-null}" -v c="${cv:-}" 'BEGIN {
		if (p == "null" && c == "") print "neither";
		else if (p == "null") print "worse";
		else if (c == "" || c > 1e20) print "better";
		else if (p < c - 1e-6 * c) print "better";
		else if (p > c + 1e-6 * c) print "worse";
		else print "tie" }')
	case $verdict in better) better=$((better+1));; worse) worse=$((worse+1));; tie) ties=$((ties+1));; esac
	total=$((total+1))
	printf '%-10s %12s %12s %12s %12s %-8s %s\n' "$b" "${pv:-none}" "${pb:-?}" "${cv:-none}" "${cb:--}" "$cs" "$verdict"
done
echo "pincer better on $better of $total files, CBC better on $worse, tied on $ties"
