#!/usr/bin/env bash
# Times the tuned-SVM grid (4 C x 4 gamma, 5 inner folds, 10 outer folds on
# Breast Cancer) with scikit-learn's GridSearchCV (scripts/speed/svm_grid.py)
# and with fringe's TunedSVM (scripts/speed/svmgrid), start-up and data
# loading included, in one run, and prints the speed ratios. The runs are
# interleaved (python, fringe with 1 worker, fringe with 2 workers, fringe
# without reuse) RUNS times (default 5) and the median wall time of each
# counts. fringe is built first (build time excluded). The two programs
# print the chosen parameters and accuracy of every outer fold; the script
# reports whether they agree line for line.
# usage: scripts/speed/svm_grid.sh [RUNS]
set -euo pipefail
cd "$(dirname "$0")/../.."
runs=${1:-5}
py=/usr/bin/python3
$py -c 'import sklearn' 2>/dev/null || { echo "needs Debian's python3-sklearn (apt-get install python3-sklearn)"; exit 2; }
d=$(mktemp -d); trap 'rm -rf "$d"' EXIT
go build -o "$d/svmgrid" ./scripts/speed/svmgrid
now() { date +%s.%N; }
timeit() { # name command...
  local name=$1; shift
  local s e
  s=$(now); "$@" > "$d/$name.out" 2>/dev/null; e=$(now)
  awk -v a="$s" -v b="$e" 'BEGIN{print b-a}' >> "$d/$name.times"
}
median() { sort -g | awk '{v[NR]=$1} END{print (NR%2) ? v[(NR+1)/2] : (v[NR/2]+v[NR/2+1])/2}'; }
for _ in $(seq "$runs"); do
  timeit py $py scripts/speed/svm_grid.py
  timeit go1 "$d/svmgrid" -workers 1
  timeit go2 "$d/svmgrid" -workers 2
  timeit nore "$d/svmgrid" -workers 1 -reuse=false
done
py_t=$(median < "$d/py.times"); g1=$(median < "$d/go1.times"); g2=$(median < "$d/go2.times"); nr=$(median < "$d/nore.times")
printf 'scikit-learn %s GridSearchCV (numpy %s): %.3f s (median of %d)\n' \
  "$($py -c 'import sklearn; print(sklearn.__version__)')" "$($py -c 'import numpy; print(numpy.__version__)')" "$py_t" "$runs"
printf 'fringe TunedSVM, 1 worker:   %.3f s, ratio %.1fx\n' "$g1" "$(awk -v a="$py_t" -v b="$g1" 'BEGIN{print a/b}')"
printf 'fringe TunedSVM, 2 workers:  %.3f s, ratio %.1fx\n' "$g2" "$(awk -v a="$py_t" -v b="$g2" 'BEGIN{print a/b}')"
printf 'fringe without reuse, 1 worker: %.3f s, ratio %.1fx (reuse gains %.1fx)\n' "$nr" \
  "$(awk -v a="$py_t" -v b="$nr" 'BEGIN{print a/b}')" "$(awk -v a="$nr" -v b="$g1" 'BEGIN{print a/b}')"
if cmp -s "$d/py.out" "$d/go1.out" && cmp -s "$d/py.out" "$d/go2.out" && cmp -s "$d/py.out" "$d/nore.out"; then
  echo "chosen parameters and accuracies: identical ($(tail -1 "$d/py.out"))"
else
  echo "chosen parameters or accuracies differ:"; diff "$d/py.out" "$d/go1.out" || true
fi
