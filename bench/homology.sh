#!/usr/bin/env bash
# Copyright ©2026 The crease Authors. All rights reserved.
# Use of this source code is governed by a BSD-style
# license that can be found in the LICENSE file.
#
# bench/homology.sh times `crease barcode` against GUDHI (Debian
# python3-gudhi, run with /usr/bin/python3) on the committed clouds of
# testdata/homology/bench and the settings of issue 3's calibration table,
# in one run, and prints one table row per case:
#
#   crease     the whole `crease barcode CLOUD --top-dim D [--stop-at T]`
#              process (CSV parse, distances, barcode, printing)
#   gudhi-rips RipsComplex(points, max_edge_length=T)
#              .create_simplex_tree(max_dimension=D+1).persistence(2, 0)
#   gudhi-ec   the edge-collapse path: RipsComplex(...)
#              .create_simplex_tree(max_dimension=1), collapse_edges(ITER),
#              expansion(D+1), persistence(2, 0)
#
# Each GUDHI process also loads the CSV with numpy and, for the
# enclosing-radius cases, computes that radius (crease does both too).
# Times are medians of RUNS whole-process runs (wall clock and user+sys
# CPU), memory the median peak RSS, all from /usr/bin/time -v. A GUDHI run
# that exceeds GUDHI_TIMEOUT seconds or GUDHI_MEM_GB of address space is
# reported as "timeout"/"oom" and not repeated; after a timeout the ratio
# is an upper bound, after running out of memory it is "n/a" (GUDHI cannot
# finish within GUDHI_MEM_GB at all).
# The bar counts per dimension (bars longer than 1e-9) of crease and GUDHI
# are compared and a mismatch is flagged in the last column.
#
#   ripser     Ripser (the reference implementation of U. Bauer, "Ripser:
#              efficient computation of Vietoris–Rips persistence
#              barcodes", J. Appl. Comput. Topol. 5, 2021) when RIPSER names
#              its binary: `ripser --format point-cloud --dim D
#              [--threshold T] CLOUD`. Bring its source with the search
#              tool's fetch (github:Ripser/ripser) and build it outside this
#              repository (c++ -std=c++11 -O3 -D NDEBUG ripser.cpp -o
#              ripser); none of its code is kept here.
#
# Usage: bench/homology.sh [CASE-REGEXP]
# Environment: RUNS (default 3), GUDHI_TIMEOUT (default 600),
# GUDHI_MEM_GB (default 8), ITER (collapse_edges iterations, default 1),
# SLOW (default 60: a program whose run took longer than SLOW seconds is
# not run again for that case), MODES (default "rips ec": the GUDHI paths
# to time; empty times crease alone), CREASE_FLAGS (extra flags for
# crease barcode, e.g. --edge-collapse).
set -euo pipefail
cd "$(dirname "$0")/.."

RUNS=${RUNS:-3}
GUDHI_TIMEOUT=${GUDHI_TIMEOUT:-600}
GUDHI_MEM_GB=${GUDHI_MEM_GB:-8}
ITER=${ITER:-1}
SLOW=${SLOW:-60}
MODES=${MODES-rips ec}
RIPSER=${RIPSER:-}
if [ -n "$RIPSER" ]; then
	[ -x "$RIPSER" ] || { echo "RIPSER=$RIPSER is not an executable" >&2; exit 1; }
	MODES="${MODES:+$MODES }ripser"
fi
CREASE_FLAGS=${CREASE_FLAGS:-}
FILTER=${1:-.}
PY=/usr/bin/python3
DATA=testdata/homology/bench

if [ ! -x /usr/bin/time ]; then
	echo "== installing Debian's time (for /usr/bin/time -v)" >&2
	export DEBIAN_FRONTEND=noninteractive
	apt-get update -q >&2
	apt-get install -y -q time >&2
fi
"$PY" -c 'import gudhi, numpy' || { echo "need python3-gudhi and python3-numpy for $PY" >&2; exit 1; }

tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
CGO_ENABLED=0 go build -o "$tmp/crease" ./cmd/crease

cat >"$tmp/gudhi_bars.py" <<'EOF'
# argv: cloud.csv maxdim threshold(0 = enclosing radius) path(rips|ec) iterations out
import sys
import numpy as np
import gudhi

path, maxdim, thr, mode, it, out = sys.argv[1], int(sys.argv[2]), float(sys.argv[3]), sys.argv[4], int(sys.argv[5]), sys.argv[6]
x = np.loadtxt(path, delimiter=",", ndmin=2)
if thr <= 0:
    # enclosing radius, min over points of the max distance, in blocks
    enc = np.inf
    sq = (x * x).sum(axis=1)
    for s in range(0, len(x), 256):
        b = x[s:s + 256]
        d2 = sq[s:s + 256, None] + sq[None, :] - 2 * b @ x.T
        enc = min(enc, float(np.sqrt(np.maximum(d2, 0).max(axis=1)).min()))
    thr = enc * (1 + 1e-9)
rc = gudhi.RipsComplex(points=x, max_edge_length=thr)
if mode == "rips":
    st = rc.create_simplex_tree(max_dimension=maxdim + 1)
else:
    st = rc.create_simplex_tree(max_dimension=1)
    st.collapse_edges(nb_iterations=it)
    st.expansion(maxdim + 1)
st.persistence(homology_coeff_field=2, min_persistence=0)
counts = []
for d in range(maxdim + 1):
    iv = st.persistence_intervals_in_dimension(d)
    counts.append(str(int(sum(1 for b, e in iv if e - b > 1e-9))))
with open(out, "w") as f:
    f.write(" ".join(counts) + "\n")
EOF

# cases: name file maxdim threshold (0 = enclosing radius)
cases=(
	"torus2000/thr1.0 torus2000.csv 1 1.0"
	"torus2000/thr1.5 torus2000.csv 1 1.5"
	"torus2000/thr3.0 torus2000.csv 1 3.0"
	"torus2000/enclosing torus2000.csv 1 0"
	"clusters1500_r16/enclosing clusters1500_r16.csv 1 0"
	"digits1797/enclosing digits1797.csv 1 0"
	"noisycircle1000/enclosing noisycircle1000.csv 1 0"
	"sphere600/H2/thr1.0 sphere600.csv 2 1.0"
)

# median of the numbers on stdin
median() { sort -g | awk '{a[NR]=$1} END {if (NR==0) print "nan"; else if (NR%2) print a[(NR+1)/2]; else print (a[NR/2]+a[NR/2+1])/2}'; }

# timed LABEL CMD...: runs CMD under /usr/bin/time -v, appends
# "wall cpu rssMB status" to $tmp/LABEL.runs
timed() {
	local label=$1
	shift
	local st=0
	/usr/bin/time -v -o "$tmp/tv" "$@" >"$tmp/out" 2>"$tmp/err" || st=$?
	local wall cpu rss
	wall=$(awk -F': ' '/Elapsed \(wall clock\)/ {n=split($2,p,":"); s=0; for(i=1;i<=n;i++) s=s*60+p[i]; print s}' "$tmp/tv")
	cpu=$(awk -F': ' '/User time/ {u=$2} /System time/ {s=$2} END {print u+s}' "$tmp/tv")
	rss=$(awk -F': ' '/Maximum resident set size/ {printf "%.0f", $2/1024}' "$tmp/tv")
	local status=ok
	if [ $st -ne 0 ]; then
		if [ $st -eq 124 ] || [ $st -eq 137 ] || grep -q "Command terminated by signal 9" "$tmp/tv"; then
			status=timeout
		elif grep -qi "memory\|bad_alloc" "$tmp/err"; then
			status=oom
		else
			status=fail$st
			sed 's/^/    /' "$tmp/err" | tail -3 >&2
		fi
	fi
	echo "$wall $cpu $rss $status" >>"$tmp/$label.runs"
}

# slow LABEL: true if the last run of LABEL took longer than SLOW seconds
slow() { tail -1 "$tmp/$1.runs" | awk -v s="$SLOW" '{exit !($1 > s)}'; }

# summary LABEL: "wall cpu rss status" medians (status of the last run)
summary() {
	local f="$tmp/$1.runs"
	printf '%s %s %s %s\n' "$(awk '{print $1}' "$f" | median)" "$(awk '{print $2}' "$f" | median)" \
		"$(awk '{print $3}' "$f" | median)" "$(tail -1 "$f" | awk '{print $4}')"
}

cell() { # wall cpu rss status -> printable cell
	if [ "$4" = ok ]; then printf '%.2f s (cpu %.2f) %d MB' "$1" "$2" "$3"; else printf '%s (> %.0f s)' "$4" "$1"; fi
}
ratio() { # crease-wall other-wall other-status
	case $3 in
	ok) awk -v a="$1" -v b="$2" 'BEGIN {printf "%.2f", a/b}' ;;
	timeout) awk -v a="$1" -v b="$2" 'BEGIN {printf "< %.2f", a/b}' ;;
	*) printf 'n/a (gudhi %s)' "$3" ;;
	esac
}

echo "# bench/homology.sh $(date -u '+%Y-%m-%d %H:%M UTC'), $(nproc) cores, load average at start: $(cut -d' ' -f1-3 /proc/loadavg)"
echo "# $(go version | cut -d' ' -f3), gudhi $("$PY" -c 'import gudhi; print(gudhi.__version__)'), RUNS=$RUNS, crease flags: ${CREASE_FLAGS:-none}, collapse_edges(nb_iterations=$ITER), GUDHI limits ${GUDHI_TIMEOUT} s / ${GUDHI_MEM_GB} GB"
echo
head="| case | crease"
rule="|---|---"
for mode in $MODES; do
	if [ "$mode" = ripser ]; then head="$head | ripser"; else head="$head | gudhi-$mode"; fi
	rule="$rule|---"
done
for mode in $MODES; do head="$head | crease/$mode"; rule="$rule|---"; done
echo "$head | bars (crease${MODES:+; ${MODES// /; }}) |"
echo "$rule|---|"
for c in "${cases[@]}"; do
	read -r name file maxdim thr <<<"$c"
	[[ $name =~ $FILTER ]] || continue
	key=${name//\//_}
	args=(barcode "$DATA/$file" --top-dim "$maxdim")
	if [ "$thr" != 0 ]; then args+=(--stop-at "$thr"); fi
	# shellcheck disable=SC2206 # split the extra flags on purpose
	args+=($CREASE_FLAGS)
	for _ in $(seq "$RUNS"); do
		timed "$key.crease" "$tmp/crease" "${args[@]}"
		if slow "$key.crease"; then break; fi
	done
	crease_counts=$(awk -v m="$maxdim" -F'\t' 'NR>1 && ($3=="inf" || $3-$2>1e-9) {n[$1]++} END {s=""; for(d=0;d<=m;d++) s=s (d?" ":"") (n[d]+0); print s}' "$tmp/out")
	read -r cw cc cr cs <<<"$(summary "$key.crease")"
	row="| $name | $(cell "$cw" "$cc" "$cr" "$cs")"
	ratios=""
	bars="$crease_counts"
	for mode in $MODES; do
		for _ in $(seq "$RUNS"); do
			rm -f "$tmp/counts"
			if [ "$mode" = ripser ]; then
				targ=""
				if [ "$thr" != 0 ]; then targ="--threshold $thr"; fi
				timed "$key.$mode" bash -c "ulimit -v $((GUDHI_MEM_GB * 1024 * 1024)); exec timeout -s KILL $GUDHI_TIMEOUT $RIPSER --format point-cloud --dim $maxdim $targ $DATA/$file"
				# bars longer than 1e-9 (or infinite) per dimension
				awk -v m="$maxdim" '/persistence intervals in dim/ {d=$NF; sub(":","",d); next}
					/^ \[/ {s=$0; gsub(/[\[\) ]/,"",s); split(s,p,","); if (p[2]=="" || p[2]-p[1]>1e-9) n[d]++}
					END {s=""; for(k=0;k<=m;k++) s=s (k?" ":"") (n[k]+0); print s}' "$tmp/out" >"$tmp/counts"
			else
				timed "$key.$mode" bash -c "ulimit -v $((GUDHI_MEM_GB * 1024 * 1024)); exec timeout -s KILL $GUDHI_TIMEOUT $PY $tmp/gudhi_bars.py $DATA/$file $maxdim $thr $mode $ITER $tmp/counts"
			fi
			if [ "$(tail -1 "$tmp/$key.$mode.runs" | awk '{print $4}')" != ok ] || slow "$key.$mode"; then break; fi
		done
		read -r gw gc gr gs <<<"$(summary "$key.$mode")"
		row="$row | $(cell "$gw" "$gc" "$gr" "$gs")"
		ratios="$ratios | $(ratio "$cw" "$gw" "$gs")"
		if [ -f "$tmp/counts" ]; then
			g=$(cat "$tmp/counts")
			if [ "$g" = "$crease_counts" ]; then bars="$bars; $g"; else bars="$bars; $g MISMATCH"; fi
		else
			bars="$bars; -"
		fi
	done
	echo "$row$ratios | $bars |"
done
echo
echo "# load average at end: $(cut -d' ' -f1-3 /proc/loadavg)"
