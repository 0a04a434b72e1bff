#!/usr/bin/env bash
# Copyright ©2026 The crease Authors. All rights reserved.
# Use of this source code is governed by a BSD-style
# license that can be found in the LICENSE file.
#
# bench/homology.sh times `crease barcode` against the reference programs
# that are installed, on the same clouds and settings, in one run, and
# prints one table row per case:
#
#   crease     the whole `crease barcode CLOUD --top-dim D [--stop-at T]`
#              process (CSV parse, distances, barcode, printing)
#   ripser     Ripser (the reference implementation of U. Bauer, "Ripser:
#              efficient computation of Vietoris–Rips persistence
#              barcodes", J. Appl. Comput. Topol. 5, 2021): `ripser
#              --format point-cloud --dim D [--threshold T] CLOUD`, when
#              RIPSER names its binary or `ripser` is on the PATH. Bring
#              its source with the search tool's fetch (github:Ripser/ripser)
#              and build it outside this repository (c++ -std=c++11 -O3
#              -D NDEBUG ripser.cpp -o ripser); none of its code is kept
#              here. Ripser computes in float (value_t) and prints six
#              significant digits.
#   gudhi-ec   GUDHI's exact edge collapse, in C++: bench/gudhi_collapse.cpp
#              (our driver; see its comment) against Debian's libgudhi-dev
#              3.7.1 headers, built by this script into its temporary
#              directory when GUDHI_EC=1, or by default when the headers
#              are installed (apt-get install libgudhi-dev libboost-dev).
#              It is never built by go test or .ci/run.
#   py-rips    MODES "rips": GUDHI's Python RipsComplex(points,
#              max_edge_length=T).create_simplex_tree(max_dimension=D+1)
#              .persistence(2, 0) (Debian python3-gudhi)
#   py-ec      MODES "ec": the same through create_simplex_tree(
#              max_dimension=1), collapse_edges(ITER), expansion(D+1)
#
# Cases: every cloud of testdata/homology/bench, plus relu_circle3000 (the
# ReLU image of a noisy circle in R⁶⁴, 3000 points, made here by
# `go run testdata/gen/relu_circle.go`), each for H≤1 and H≤2, at a
# quarter and at a half of the cloud's diameter (each moved to the middle
# of the widest gap between pairwise distances within 0.5 % of it, so
# that no edge sits within rounding of the cut, float included) and at
# the enclosing radius (each program's default threshold); then the
# calibration cases of issue 3 (torus2000 at 1.0, 1.5, 3.0 and
# sphere600 H≤2 at 1.0). Cases that take many minutes for some program
# match HEAVY and run only when the CASE-REGEXP argument is given and
# matches them.
#
# Rounds are interleaved (crease, ripser, gudhi-ec, crease, ...), RUNS of
# them. Times are medians of whole-process runs (wall clock and user+sys
# CPU: crease uses every core, the references one), memory the median
# peak RSS, from /usr/bin/time -v. A program whose run exceeds TIMEOUT
# seconds or MEM_GB of address space (ulimit -v) is reported as
# "timeout"/"oom" and not run again for that case; so is one whose run
# took longer than SLOW seconds (its single time is kept). The ratios
# are crease's wall time and peak RSS over those of the best reference
# that finished (fastest, least memory); "< r" when none finished and one
# timed out. The last column compares each reference's barcode with
# crease's as multisets per dimension, birth and death within a relative
# tolerance (GUDHI: 1e-9 relative plus 1e-12 of the largest value;
# Ripser, float arithmetic and six printed digits: 2e-5 plus 1e-6),
# ignoring bars shorter than the tolerance (zero-length bars are dropped
# by all programs, but at different precisions): "=" agree, else
# the first difference. Only finished runs are compared: a stopped Ripser
# run has printed only the bars of the columns it had reduced (in
# decreasing order of birth), and the long bar of a circle can be the
# one column that takes nearly all the time (TestReLUCircleBar in
# homology/relu_circle_test.go). The rows are followed by the cases
# where crease loses: slower, heavier (a ratio above 1), or failed where
# a reference finished.
#
# Usage: bench/homology.sh [CASE-REGEXP]
# Environment: RUNS (default 3), TIMEOUT (default 600; GUDHI_TIMEOUT is
# the old name), MEM_GB (default 8; GUDHI_MEM_GB), SLOW (default 60),
# MODES (default: "ripser gudhi-ec", those that are installed; add "rips"
# and "ec" for GUDHI's Python paths; empty times crease alone), RIPSER
# (Ripser's binary), GUDHI_EC (1: build the driver, failing if the
# headers are missing; 0: do not), ITER (collapse_edges iterations of
# "ec", default 1), HEAVY (regexp of the cases skipped without an
# argument), CREASE_FLAGS (extra flags for crease barcode, e.g.
# --edge-collapse), CXX (default c++).
set -euo pipefail
cd "$(dirname "$0")/.."

RUNS=${RUNS:-3}
TIMEOUT=${TIMEOUT:-${GUDHI_TIMEOUT:-600}}
MEM_GB=${MEM_GB:-${GUDHI_MEM_GB:-8}}
SLOW=${SLOW:-60}
ITER=${ITER:-1}
CXX=${CXX:-c++}
CREASE_FLAGS=${CREASE_FLAGS:-}
# Each of these took Ripser past 200 s (and GUDHI's edge collapse past
# 8 GB) on 2 cores, RUNS=1 of this script, 2026-12-03; the other H2 cases
# take at most a few minutes in all.
HEAVY=${HEAVY:-'^(torus2000|relu_circle3000)/H2/(half|enclosing)$'}
FILTER=${1:-}
PY=/usr/bin/python3
DATA=testdata/homology/bench
GUDHI_HEADER=/usr/include/gudhi/Flag_complex_edge_collapser.h

if [ ! -x /usr/bin/time ]; then
	echo "== installing Debian's time (for /usr/bin/time -v)" >&2
	export DEBIAN_FRONTEND=noninteractive
	apt-get update -q >&2
	apt-get install -y -q time >&2
fi
"$PY" -c 'import numpy' || { echo "need python3-numpy for $PY" >&2; exit 1; }

tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
CGO_ENABLED=0 go build -o "$tmp/crease" ./cmd/crease

# Which references: MODES if set, else those installed; RIPSER=... and
# GUDHI_EC=1 add theirs to any MODES.
RIPSER_SET=${RIPSER:-}
RIPSER=${RIPSER:-$(command -v ripser || true)}
if [ -z "${MODES+set}" ]; then
	MODES=""
	if [ -n "$RIPSER" ]; then MODES="ripser"; fi
	if [ "${GUDHI_EC:-}" != 0 ] && [ -f "$GUDHI_HEADER" ]; then MODES="${MODES:+$MODES }gudhi-ec"; fi
fi
if [ -n "$RIPSER_SET" ] && [[ " $MODES " != *" ripser "* ]]; then MODES="${MODES:+$MODES }ripser"; fi
if [ "${GUDHI_EC:-}" = 1 ] && [[ " $MODES " != *" gudhi-ec "* ]]; then MODES="${MODES:+$MODES }gudhi-ec"; fi
for mode in $MODES; do
	case $mode in
	ripser)
		[ -n "$RIPSER" ] && [ -x "$RIPSER" ] || { echo "MODES has ripser but RIPSER='$RIPSER' is not an executable" >&2; exit 1; }
		;;
	gudhi-ec)
		[ -f "$GUDHI_HEADER" ] || { echo "gudhi-ec needs $GUDHI_HEADER (apt-get install libgudhi-dev libboost-dev)" >&2; exit 1; }
		echo "== building bench/gudhi_collapse.cpp into $tmp" >&2
		"$CXX" -std=c++17 -O3 -DNDEBUG bench/gudhi_collapse.cpp -o "$tmp/gudhi_collapse"
		;;
	rips | ec)
		"$PY" -c 'import gudhi' || { echo "MODES $mode needs python3-gudhi for $PY" >&2; exit 1; }
		;;
	*)
		echo "unknown mode $mode (want ripser, gudhi-ec, rips or ec)" >&2
		exit 1
		;;
	esac
done

# Python helpers (numpy; gudhi only for the rips and ec modes).
cat >"$tmp/cloudinfo.py" <<'EOF'
# argv: cloud.csv; prints "diameter enclosing quarter half": the largest
# pairwise distance, the enclosing radius, and thresholds near a quarter
# and a half of the diameter, each the middle of the widest gap between
# consecutive pairwise distances within 0.5 % of the target.
import sys
import numpy as np

x = np.loadtxt(sys.argv[1], delimiter=",", ndmin=2)
n = len(x)
sq = (x * x).sum(axis=1)
far = np.zeros(n)
diam = 0.0
for s in range(0, n, 256):
    d2 = sq[s:s + 256, None] + sq[None, :] - 2 * x[s:s + 256] @ x.T
    d = np.sqrt(np.maximum(d2, 0))
    far[s:s + 256] = d.max(axis=1)
    diam = max(diam, float(d.max()))
enc = float(far.min())


def safe(target):
    lo, hi = target * 0.995, target * 1.005
    near = []
    for s in range(0, n, 256):
        d2 = sq[s:s + 256, None] + sq[None, :] - 2 * x[s:s + 256] @ x.T
        i, j = np.nonzero((d2 > (lo * 0.99) ** 2) & (d2 < (hi * 1.01) ** 2))
        i = i + s
        keep = i < j
        i, j = i[keep], j[keep]
        # exact distances (differences, not the Gram trick) for the candidates
        near.append(np.sqrt(((x[i] - x[j]) ** 2).sum(axis=1)))
    d = np.sort(np.concatenate(near + [np.array([lo, hi])]))
    d = d[(d >= lo) & (d <= hi)]
    k = int(np.argmax(np.diff(d)))
    return (d[k] + d[k + 1]) / 2


print("%.17g %.17g %.9g %.9g" % (diam, enc, safe(diam / 4), safe(diam / 2)))
EOF

cat >"$tmp/gudhi_bars.py" <<'EOF'
# argv: cloud.csv maxdim threshold(0 = enclosing radius) path(rips|ec) iterations
# prints the barcode in the format of crease barcode
import sys
import numpy as np
import gudhi

path, maxdim, thr, mode, it = sys.argv[1], int(sys.argv[2]), float(sys.argv[3]), sys.argv[4], int(sys.argv[5])
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
out = ["dim\tlo\thi"]
for d in range(maxdim + 1):
    for b, e in sorted(st.persistence_intervals_in_dimension(d).tolist()):
        out.append("%d\t%.17g\t%s" % (d, b, "inf" if np.isinf(e) else "%.17g" % e))
print("\n".join(out))
EOF

cat >"$tmp/barcmp.py" <<'EOF'
# argv: crease.tsv other.tsv maxdim rtol atol; prints "=" when the
# barcodes agree as multisets per dimension, else the first difference.
# Birth and death must agree within rtol relative plus atol times the
# largest finite value of both barcodes (float rounding of the coordinates
# is absolute, not relative to a short distance); infinite deaths must
# both be infinite; bars shorter than that tolerance are ignored on both
# sides.
import bisect
import math
import sys

def load(path, maxdim):
    bars = [[] for _ in range(maxdim + 1)]
    with open(path) as f:
        for line in f:
            p = line.split()
            if len(p) != 3 or p[0] == "dim":
                continue
            d, b, e = int(p[0]), float(p[1]), float(p[2])
            if d <= maxdim:
                bars[d].append((b, e))
    return bars

want_path, got_path, maxdim = sys.argv[1], sys.argv[2], int(sys.argv[3])
rtol, atol = float(sys.argv[4]), float(sys.argv[5])
want, got = load(want_path, maxdim), load(got_path, maxdim)
scale = max([abs(v) for bs in want + got for b in bs for v in b if not math.isinf(v)] + [0.0])
eps = atol * scale

def tol(a):
    return rtol * abs(a) + eps

def near(a, b):
    if math.isinf(a) or math.isinf(b):
        return a == b
    return abs(a - b) <= tol(max(abs(a), abs(b)))

for d in range(maxdim + 1):
    w = sorted(x for x in want[d] if math.isinf(x[1]) or not near(x[0], x[1]))
    g = sorted(x for x in got[d] if math.isinf(x[1]) or not near(x[0], x[1]))
    if len(w) != len(g):
        print("H%d: %d bars, crease %d" % (d, len(g), len(w)))
        sys.exit()
    births = [b for b, _ in g]
    used = [False] * len(g)
    for b, e in w:
        k = bisect.bisect_left(births, b - tol(b))
        while k < len(g) and births[k] <= b + tol(b):
            if not used[k] and near(g[k][0], b) and near(g[k][1], e):
                used[k] = True
                break
            k += 1
        else:
            print("H%d: no bar for crease's [%.6g, %.6g)" % (d, b, e))
            sys.exit()
print("=")
EOF

# Ripser's output as a crease barcode (6 significant digits).
ripser_tsv() {
	awk 'BEGIN {print "dim\tlo\thi"}
		/persistence intervals in dim/ {d=$NF; sub(":","",d); next}
		/^ \[/ {s=$0; gsub(/[\[\) ]/,"",s); split(s,p,","); print d "\t" p[1] "\t" (p[2]=="" ? "inf" : p[2])}' "$1"
}

# The clouds: the committed ones and the ReLU circle.
go run testdata/gen/relu_circle.go -n 3000 >"$tmp/relu_circle3000.csv"
clouds=()
for f in "$DATA"/*.csv; do clouds+=("$(basename "$f" .csv)=$f"); done
clouds+=("relu_circle3000=$tmp/relu_circle3000.csv")
cloudpath() { local c; for c in "${clouds[@]}"; do if [ "${c%%=*}" = "$1" ]; then echo "${c#*=}"; fi; done; }

# cases: name cloud maxdim threshold (0: the enclosing radius; quarter
# and half: of the diameter, worked out when the case runs)
cases=()
for c in "${clouds[@]}"; do
	for d in 1 2; do
		for t in quarter half enclosing; do
			thr=$t
			if [ "$t" = enclosing ]; then thr=0; fi
			cases+=("${c%%=*}/H$d/$t ${c%%=*} $d $thr")
		done
	done
done
cases+=(
	"torus2000/H1/thr1.0 torus2000 1 1.0"
	"torus2000/H1/thr1.5 torus2000 1 1.5"
	"torus2000/H1/thr3.0 torus2000 1 3.0"
	"sphere600/H2/thr1.0 sphere600 2 1.0"
)

# cloudinfo CLOUD: fills info[CLOUD] with "diameter enclosing quarter
# half" (cloudinfo.py, once per cloud; call it outside $(...))
declare -A info=()
cloudinfo() {
	if [ -z "${info[$1]:-}" ]; then info[$1]=$("$PY" "$tmp/cloudinfo.py" "$(cloudpath "$1")"); fi
}

# median of the numbers on stdin
median() { sort -g | awk '{a[NR]=$1} END {if (NR==0) print "nan"; else if (NR%2) print a[(NR+1)/2]; else print (a[NR/2]+a[NR/2+1])/2}'; }

# timed LABEL OUT CMD...: runs CMD under /usr/bin/time -v, TIMEOUT and
# MEM_GB, stdout to OUT; appends "wall cpu rssMB status" to $tmp/LABEL.runs
timed() {
	local label=$1 out=$2
	shift 2
	local st=0 t0 t1
	t0=$EPOCHREALTIME
	/usr/bin/time -v -o "$tmp/tv" bash -c 'ulimit -v $(('"$MEM_GB"' * 1024 * 1024)); exec timeout -s KILL '"$TIMEOUT"' "$@"' _ "$@" >"$out" 2>"$tmp/err" || st=$?
	t1=$EPOCHREALTIME
	local wall cpu rss
	# wall clock from bash (µs; /usr/bin/time rounds to 10 ms), CPU and RSS from time -v
	wall=$(awk -v a="$t0" -v b="$t1" 'BEGIN {printf "%.4f", b - a}')
	cpu=$(awk -F': ' '/User time/ {u=$2} /System time/ {s=$2} END {print u+s}' "$tmp/tv")
	rss=$(awk -F': ' '/Maximum resident set size/ {printf "%.0f", $2/1024}' "$tmp/tv")
	local status=ok
	if [ $st -ne 0 ]; then
		if [ $st -eq 124 ] || [ $st -eq 137 ] || grep -q "Command terminated by signal 9" "$tmp/tv"; then
			status=timeout
		elif grep -qi "memory\|bad_alloc\|cannot allocate" "$tmp/err"; then
			status=oom
		else
			status=fail$st
			sed 's/^/    /' "$tmp/err" | tail -3 >&2
		fi
	fi
	echo "$wall $cpu $rss $status" >>"$tmp/$label.runs"
}

# summary LABEL: "wall cpu rss status", medians of the runs that finished
# (the last run when none did), status of the last run
summary() {
	local f="$tmp/$1.runs"
	if grep -q ' ok$' "$f"; then
		printf '%s %s %s %s\n' "$(awk '$4=="ok" {print $1}' "$f" | median)" "$(awk '$4=="ok" {print $2}' "$f" | median)" \
			"$(awk '$4=="ok" {print $3}' "$f" | median)" ok
	else
		tail -1 "$f"
	fi
}

cell() { # wall cpu rss status -> printable cell
	if [ "$4" != ok ]; then printf '%s (> %.0f s)' "$4" "$1"; return; fi
	awk -v w="$1" -v c="$2" -v r="$3" 'BEGIN {f = (w < 1) ? "%.3f s (cpu %.2f) %d MB" : "%.2f s (cpu %.2f) %d MB"; printf f, w, c, r}'
}

# run LABEL MODE CLOUD MAXDIM THR OUT: one run of a program on a case
run() {
	local label=$1 mode=$2 file=$3 maxdim=$4 thr=$5 out=$6
	local targ=()
	case $mode in
	crease)
		if [ "$thr" != 0 ]; then targ=(--stop-at "$thr"); fi
		# shellcheck disable=SC2086 # split the extra flags on purpose
		timed "$label" "$out" "$tmp/crease" barcode "$file" --top-dim "$maxdim" "${targ[@]}" $CREASE_FLAGS
		;;
	ripser)
		if [ "$thr" != 0 ]; then targ=(--threshold "$thr"); fi
		timed "$label" "$out.raw" "$RIPSER" --format point-cloud --dim "$maxdim" "${targ[@]}" "$file"
		ripser_tsv "$out.raw" >"$out"
		;;
	gudhi-ec)
		timed "$label" "$out" "$tmp/gudhi_collapse" "$file" "$maxdim" "$thr"
		;;
	rips | ec)
		timed "$label" "$out" "$PY" "$tmp/gudhi_bars.py" "$file" "$maxdim" "$thr" "$mode" "$ITER"
		;;
	esac
}

column() { case $1 in rips) echo py-rips ;; ec) echo py-ec ;; *) echo "$1" ;; esac; }

echo "# bench/homology.sh $(date -u '+%Y-%m-%d %H:%M UTC'), $(nproc) cores, load average at start: $(cut -d' ' -f1-3 /proc/loadavg)"
refs=""
for mode in $MODES; do
	case $mode in
	ripser) refs="$refs, ripser $RIPSER" ;;
	gudhi-ec) refs="$refs, gudhi-ec $(dpkg-query -W -f='libgudhi-dev ${Version}' libgudhi-dev 2>/dev/null || echo 'GUDHI headers')" ;;
	rips | ec) refs="$refs, $(column "$mode") gudhi $("$PY" -c 'import gudhi; print(gudhi.__version__)')" ;;
	esac
done
echo "# $(go version | cut -d' ' -f3)${refs:-, crease alone}; RUNS=$RUNS, crease flags: ${CREASE_FLAGS:-none}, limits ${TIMEOUT} s / ${MEM_GB} GB, SLOW=$SLOW"
echo
head="| case | threshold | crease"
rule="|---|---|---"
for mode in $MODES; do head="$head | $(column "$mode")"; rule="$rule|---"; done
echo "$head | time ratio | RSS ratio | bars |"
echo "$rule|---|---|---|"
slower=() heavier=() failed=()
for c in "${cases[@]}"; do
	read -r name cloud maxdim thr <<<"$c"
	if [ -n "$FILTER" ]; then
		[[ $name =~ $FILTER ]] || continue
	elif [[ $name =~ $HEAVY ]]; then
		row="| $name | | not run (HEAVY; pass a CASE-REGEXP that matches it)"
		for _ in $MODES; do row="$row | "; done
		echo "$row | | | |"
		continue
	fi
	case $thr in
	quarter | half)
		cloudinfo "$cloud"
		read -r _ _ quarter half <<<"${info[$cloud]}"
		if [ "$thr" = quarter ]; then thr=$quarter; else thr=$half; fi
		;;
	esac
	file=$(cloudpath "$cloud")
	key=${name//\//_}
	progs="crease $MODES"
	declare -A active=()
	for p in $progs; do active[$p]=1; done
	for _ in $(seq "$RUNS"); do
		for p in $progs; do
			[ "${active[$p]}" = 1 ] || continue
			run "$key.$p" "$p" "$file" "$maxdim" "$thr" "$tmp/$key.$p.try"
			last=$(tail -1 "$tmp/$key.$p.runs")
			if [ "$(echo "$last" | awk '{print $4}')" = ok ]; then mv "$tmp/$key.$p.try" "$tmp/$key.$p.out"; fi
			if [ "$(echo "$last" | awk '{print $4}')" != ok ] || echo "$last" | awk -v s="$SLOW" '{exit !($1 > s)}'; then
				active[$p]=0
			fi
		done
	done
	read -r cw cc cr cs <<<"$(summary "$key.crease")"
	thrcell=$thr
	if [ "$thr" = 0 ]; then thrcell=enclosing; fi
	row="| $name | $thrcell | $(cell "$cw" "$cc" "$cr" "$cs")"
	bestw="" bestr="" timedout=""
	bars=""
	for mode in $MODES; do
		read -r gw gc gr gs <<<"$(summary "$key.$mode")"
		row="$row | $(cell "$gw" "$gc" "$gr" "$gs")"
		if [ "$gs" = ok ]; then
			bestw=$(awk -v a="$gw" -v b="$bestw" 'BEGIN {print (b=="" || a<b) ? a : b}')
			bestr=$(awk -v a="$gr" -v b="$bestr" 'BEGIN {print (b=="" || a<b) ? a : b}')
		elif [ "$gs" = timeout ]; then
			timedout=$(awk -v a="$gw" -v b="$timedout" 'BEGIN {print (b=="" || a<b) ? a : b}')
		fi
		tol="1e-9 1e-12"
		if [ "$mode" = ripser ]; then tol="2e-5 1e-6"; fi
		if [ "$cs" = ok ] && [ "$gs" = ok ]; then
			# shellcheck disable=SC2086 # two numbers
			bars="$bars${bars:+; }$(column "$mode") $("$PY" "$tmp/barcmp.py" "$tmp/$key.crease.out" "$tmp/$key.$mode.out" "$maxdim" $tol)"
		else
			bars="$bars${bars:+; }$(column "$mode") -"
		fi
	done
	tr="-" rr="-"
	if [ "$cs" = ok ] && [ -n "$bestw" ]; then
		tr=$(awk -v a="$cw" -v b="$bestw" 'BEGIN {printf "%.2f", a/b}')
		rr=$(awk -v a="$cr" -v b="$bestr" 'BEGIN {printf "%.2f", a/b}')
		if awk -v t="$tr" 'BEGIN {exit !(t > 1)}'; then slower+=("$name ×$tr"); fi
		if awk -v r="$rr" 'BEGIN {exit !(r > 1)}'; then heavier+=("$name ×$rr"); fi
	elif [ "$cs" = ok ] && [ -n "$timedout" ]; then
		tr=$(awk -v a="$cw" -v b="$timedout" 'BEGIN {printf "< %.2f", a/b}')
	elif [ "$cs" != ok ] && [ -n "$bestw" ]; then
		failed+=("$name: crease $cs, a reference finished")
	fi
	echo "$row | $tr | $rr | ${bars:--} |"
	unset active
done
echo
for c in "${clouds[@]}"; do
	name=${c%%=*}
	if [ -n "${info[$name]:-}" ]; then
		read -r diam enc _ _ <<<"${info[$name]}"
		printf '# %s: diameter %.6g, enclosing radius %.6g\n' "$name" "$diam" "$enc"
	fi
done
if [ -n "$MODES" ]; then
	# losses: crease's ratio to the best reference that finished is above 1
	echo "# crease slower (time ratio > 1): ${slower[*]:-none}" | sed 's/ ×/ (×/g; s/\(×[0-9.]*\)/\1)/g; s/) /), /g'
	echo "# crease heavier (RSS ratio > 1): ${heavier[*]:-none}" | sed 's/ ×/ (×/g; s/\(×[0-9.]*\)/\1)/g; s/) /), /g'
	for l in "${failed[@]}"; do echo "# crease failed: $l"; done
fi
echo "# load average at end: $(cut -d' ' -f1-3 /proc/loadavg)"
