#!/usr/bin/env bash
# bench_dm.sh — speed of the noisy density-matrix simulator of qkernel/sim as
# a ratio to one memory pass, measured in one run on this machine (never a
# bare time).
#
# Builds ../shared/perf/stream.c in a temporary directory (gcc -O3
# -march=native) and the Go benchmark binary of qkernel/sim, then alternates
# ROUNDS rounds of
#   stream (triad bandwidth B in GB/s), BenchmarkNoisyGate (qubits 7 and 10)
# and prints, per sub-benchmark, the median ns per noisy gate, the median
# time of one pass over the density matrix (16 * 4^n bytes read and
# written once: 2 * 16 * 4^n / B ns) and their ratio (gate / pass; 1 means
# a noisy gate costs one memory pass).
#
# With --base REV it also builds the benchmark binary of the git revision
# REV (from `git archive`, in the temporary directory; the revision must
# have BenchmarkNoisyGate), runs it in the same rounds, and prints its
# ns/gate, its ratio and the speed-up REV / current.
#
# Usage: scripts/bench_dm.sh [--base REV] [ROUNDS]     (default 3 rounds)
# Environment: PERF_DIR (default <repo>/../shared/perf, or ../../shared/perf
# from a worktree).
set -euo pipefail

base=""
if [[ "${1:-}" == "--base" ]]; then base=$2; shift 2; fi
rounds=${1:-3}
root=$(cd "$(dirname "${BASH_SOURCE[0]}")/.." && pwd)
# The reference kernels sit in shared/perf beside the main checkout; from a
# worktree one level deeper, one more level up.
perf=${PERF_DIR:-}
if [[ -z "$perf" ]]; then
	for cand in "$root/../shared/perf" "$root/../../shared/perf"; do
		if [[ -f "$cand/stream.c" ]]; then perf=$cand; break; fi
	done
fi
[[ -f "${perf:-}/stream.c" ]] || { echo "bench_dm.sh: stream.c not found; set PERF_DIR" >&2; exit 2; }

tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT

gcc -O3 -march=native -o "$tmp/stream" "$perf/stream.c"
(cd "$root" && go test -c -o "$tmp/cur.test" ./qkernel/sim)
if [[ -n "$base" ]]; then
	mkdir "$tmp/base"
	(cd "$root" && git archive "$base") | tar -x -C "$tmp/base"
	(cd "$tmp/base" && go test -c -o "$tmp/base.test" ./qkernel/sim)
fi

# median of the numbers on stdin
median() { sort -g | awk '{a[NR]=$1} END {if (NR==0) {print "nan"; exit} if (NR%2) print a[(NR+1)/2]; else print (a[NR/2]+a[NR/2+1])/2}'; }

bench() { # binary, output file
	"$1" -test.run '^$' -test.bench '^BenchmarkNoisyGate$/^qubits=7/' -test.benchtime 0.5s >>"$2"
	"$1" -test.run '^$' -test.bench '^BenchmarkNoisyGate$/^qubits=10/' -test.benchtime 1x >>"$2"
}

: >"$tmp/bw"; : >"$tmp/cur"; : >"$tmp/base.out"
for ((r = 1; r <= rounds; r++)); do
	"$tmp/stream" | sed -n 's/.*triad GB\/s=\([0-9.]*\).*/\1/p' >>"$tmp/bw"
	bench "$tmp/cur.test" "$tmp/cur"
	if [[ -n "$base" ]]; then bench "$tmp/base.test" "$tmp/base.out"; fi
done

# Lines look like: BenchmarkNoisyGate/qubits=10/workload=layers/noise=depol-2  N  T ns/op  B bytes/pass  G ns/gate ...
metric() { grep "/$2-" "$1" | awk -v m="$3" '{for (i=1;i<NF;i++) if ($(i+1)==m) print $i}' | median; }

bw=$(median <"$tmp/bw")
echo "stream triad: $bw GB/s (median of $rounds rounds)"
echo "noisy density-matrix gate: ns per gate, one memory pass, ratio gate/pass (medians)"
if [[ -n "$base" ]]; then
	printf "%-44s %12s %12s %8s %12s %8s %8s\n" benchmark ns/gate pass-ns ratio base-ns base-ratio speedup
else
	printf "%-44s %12s %12s %8s\n" benchmark ns/gate pass-ns ratio
fi
for name in $(grep -o 'qubits=[0-9]*/workload=[a-z]*/noise=[a-z]*' "$tmp/cur" | awk '!seen[$0]++'); do
	g=$(metric "$tmp/cur" "$name" ns/gate)
	bytes=$(metric "$tmp/cur" "$name" bytes/pass)
	if [[ -n "$base" ]]; then
		o=$(metric "$tmp/base.out" "$name" ns/gate)
		awk -v n="$name" -v g="$g" -v by="$bytes" -v bw="$bw" -v o="$o" 'BEGIN {p = 2*by/bw; printf "%-44s %12.0f %12.0f %8.2f %12.0f %8.2f %8.2f\n", n, g, p, g/p, o, o/p, o/g}'
	else
		awk -v n="$name" -v g="$g" -v by="$bytes" -v bw="$bw" 'BEGIN {p = 2*by/bw; printf "%-44s %12.0f %12.0f %8.2f\n", n, g, p, g/p}'
	fi
done
