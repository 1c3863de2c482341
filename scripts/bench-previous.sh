#!/usr/bin/env bash
# End-to-end CPU and wall time of `falloff rates FILE --out D --plots D` on
# the two benchmark inputs of testdata/bench, this checkout against the code
# before the end-to-end speed work (issue 21; commit 217a944^ unless BASE
# says otherwise), built from a temporary git worktree. The two programs run
# in turn, RUNS times each (default 5), on 1 and 2 workers; the medians and
# their ratio are printed. Takes about 3 minutes on a 2-core machine.
#
#   scripts/bench-previous.sh            # from the repository root
#   BASE=<commit> RUNS=9 scripts/bench-previous.sh
set -euo pipefail
base=${BASE:-217a944^}
runs=${RUNS:-5}
root=$(git rev-parse --show-toplevel)
cd "$root"
tmp=$(mktemp -d)
trap 'git worktree remove --force "$tmp/base" >/dev/null 2>&1 || true; rm -rf "$tmp"' EXIT
git worktree add -q --detach "$tmp/base" "$base"
(cd "$tmp/base" && go build -o "$tmp/falloff-previous" ./cmd/falloff)
go build -o "$tmp/falloff-now" ./cmd/falloff
TIMEFORMAT='%U %S %R'
median() { sort -g | awk '{v[NR] = $1} END {print (NR % 2) ? v[(NR + 1) / 2] : (v[NR / 2] + v[NR / 2 + 1]) / 2}'; }
printf '%-28s %10s %10s %8s %10s %11s %8s\n' case "CPU s now" "CPU s prev" "ratio" "wall s now" "wall s prev" "ratio"
for f in testdata/bench/ch3nc-12mode.yaml testdata/bench/invented-84mode.yaml; do
	for jobs in 1 2; do
		: >"$tmp/now"
		: >"$tmp/previous"
		for _ in $(seq "$runs"); do
			for v in now previous; do
				rm -rf "$tmp/out"
				{ time "$tmp/falloff-$v" rates -q --jobs "$jobs" --out "$tmp/out" --plots "$tmp/out" "$f" >/dev/null 2>&1; } 2>>"$tmp/$v"
			done
		done
		cn=$(awk '{print $1 + $2}' "$tmp/now" | median)
		cp=$(awk '{print $1 + $2}' "$tmp/previous" | median)
		wn=$(awk '{print $3}' "$tmp/now" | median)
		wp=$(awk '{print $3}' "$tmp/previous" | median)
		printf '%-28s %10.3f %10.3f %7.2fx %10.3f %11.3f %7.2fx\n' "$(basename "$f" .yaml) jobs=$jobs" "$cn" "$cp" \
			"$(echo "$cp $cn" | awk '{print $1 / $2}')" "$wn" "$wp" "$(echo "$wp $wn" | awk '{print $1 / $2}')"
		eval "wall_${jobs}_now=$wn wall_${jobs}_prev=$wp"
	done
	printf '%-28s 2 workers over 1: now %.2fx, previous %.2fx\n' "$(basename "$f" .yaml)" \
		"$(echo "$wall_1_now $wall_2_now" | awk '{print $1 / $2}')" "$(echo "$wall_1_prev $wall_2_prev" | awk '{print $1 / $2}')"
done
