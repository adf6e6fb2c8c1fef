#!/usr/bin/env bash
# bench_sv.sh — speed of the state-vector gate kernel of qkernel/sim as a
# ratio to the C reference kernel ../shared/perf/sv_gate.c, measured in one
# run on this machine (never a bare time).
#
# Builds sv_gate.c in a temporary directory (gcc -O3 -march=native), builds
# the Go benchmark binary, then alternates ROUNDS rounds of
#   sv_gate 10 20000, sv_gate 20 10, BenchmarkGate (qubits=10 and 20)
# and prints the median ns per amplitude per gate of each and the ratios
# Go / C (below 1: Go is faster). With --dm it also runs
# ../shared/perf/numpy_dm.py 7 8 10 against BenchmarkDensityMatrix and prints
# those ratios (numpy / Go: how many times faster the Go simulator is).
#
# Usage: scripts/bench_sv.sh [--dm] [ROUNDS]     (default 5 rounds)
# Environment: PERF_DIR (default <repo>/../shared/perf), PYTHON (default
# /usr/bin/python3, which has numpy).
set -euo pipefail

dm=0
if [[ "${1:-}" == "--dm" ]]; then dm=1; shift; fi
rounds=${1:-5}
root=$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)
perf=${PERF_DIR:-$root/../shared/perf}
python=${PYTHON:-/usr/bin/python3}

tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT

gcc -O3 -march=native -o "$tmp/sv_gate" "$perf/sv_gate.c" -lm
(cd "$root" && go test -c -o "$tmp/sim.test" ./qkernel/sim)

# median of the numbers on stdin
median() { sort -g | awk '{a[NR]=$1} END {if (NR==0) {print "nan"; exit} if (NR%2) print a[(NR+1)/2]; else print (a[NR/2]+a[NR/2+1])/2}'; }

: >"$tmp/c10"; : >"$tmp/c20"; : >"$tmp/go"
for ((r = 1; r <= rounds; r++)); do
	"$tmp/sv_gate" 10 20000 | sed -n 's/.*ns\/amp-per-gate=\([0-9.]*\).*/\1/p' >>"$tmp/c10"
	"$tmp/sv_gate" 20 10 | sed -n 's/.*ns\/amp-per-gate=\([0-9.]*\).*/\1/p' >>"$tmp/c20"
	"$tmp/sim.test" -test.run '^$' -test.bench '^BenchmarkGate$' -test.benchtime 0.3s >>"$tmp/go"
done

# Go lines look like: BenchmarkGate/qubits=10/kernel=apply1-2  N  T ns/op  X ns/amplitude ...
gomed() { grep "qubits=$1/kernel=$2" "$tmp/go" | awk '{for (i=1;i<NF;i++) if ($(i+1)=="ns/amplitude") print $i}' | median; }

c10=$(median <"$tmp/c10")
c20=$(median <"$tmp/c20")
echo "state-vector dense 2x2 gate, ns per amplitude per gate (median of $rounds rounds)"
printf "%-8s %10s %14s %14s %12s %12s\n" qubits C Go-apply1 Go-complex ratio-apply1 ratio-complex
for n in 10 20; do
	c=$c10
	[[ $n == 20 ]] && c=$c20
	a=$(gomed "$n" apply1)
	x=$(gomed "$n" complex)
	awk -v n="$n" -v c="$c" -v a="$a" -v x="$x" 'BEGIN {printf "%-8s %10.3f %14.3f %14.3f %12.2f %12.2f\n", n, c, a, x, a/c, x/c}'
done

if ((dm)); then
	"$python" "$perf/numpy_dm.py" 7 8 10 >"$tmp/np"
	"$tmp/sim.test" -test.run '^$' -test.bench '^BenchmarkDensityMatrix$' -test.benchtime 1s >"$tmp/godm"
	echo
	echo "noisy density-matrix gate, microseconds per gate"
	printf "%-8s %12s %12s %14s\n" qubits numpy Go numpy/Go
	for n in 7 8 10; do
		np=$(sed -n "s/^n=$n .*us\/gate=\([0-9.]*\).*/\1/p" "$tmp/np")
		g=$(grep "qubits=$n-" "$tmp/godm" | awk '{for (i=1;i<NF;i++) if ($(i+1)=="ns/gate") print $i/1000}')
		awk -v n="$n" -v a="$np" -v b="$g" 'BEGIN {printf "%-8s %12.1f %12.1f %14.1f\n", n, a, b, a/b}'
	done
fi
