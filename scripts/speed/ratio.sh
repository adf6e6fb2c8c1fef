#!/usr/bin/env bash
# Times the same grid in Python (numpy + scikit-learn, scripts/speed/grid.py)
# and in fringe (scripts/speed/grid.toml), start-up and data loading
# included, and prints the speed ratios. fringe is built first (build time
# excluded).
#
# The runs are interleaved: each round runs the Python script, fringe
# writing its whole run directory (CSV, LaTeX, Markdown, significance tests
# and the figures in SVG, PDF and PNG), fringe with -figures=false (tables
# and CSV files only) and, with WORKERS > 1, fringe with -workers 1 (whole
# run directory), one after the other. A round's ratio is the Python time
# over fringe's time of the same round; the script prints the median of
# the round ratios and the median wall time of each side. Rounds that run
# next to each other see the same load, so their ratio is steadier than a
# ratio of medians taken at different times on a shared machine. The Python
# script computes the same grid and prints mean accuracies; it writes no
# files.
# usage: scripts/speed/ratio.sh [WORKERS] [ROUNDS]   (defaults 2 and 5)
set -euo pipefail
cd "$(dirname "$0")/../.."
workers=${1:-2}
rounds=${2:-5}
py=/usr/bin/python3
$py -c 'import sklearn' 2>/dev/null || { echo "needs Debian's python3-sklearn (apt-get install python3-sklearn)"; exit 2; }
d=$(mktemp -d); trap 'rm -rf "$d"' EXIT
go build -o "$d/fringe" ./bench/cmd/fringe
now() { date +%s.%N; }
timeit() { # name command...
  local name=$1; shift
  local s e
  s=$(now); "$@" > /dev/null 2>&1; e=$(now)
  awk -v a="$s" -v b="$e" 'BEGIN{print b-a}' >> "$d/$name.times"
}
median() { sort -g | awk '{v[NR]=$1} END{print (NR%2) ? v[(NR+1)/2] : (v[NR/2]+v[NR/2+1])/2}'; }
ratios() { paste "$d/py.times" "$d/$1.times" | awk '{print $1/$2}' | median; }
grid="scripts/speed/grid.toml"
for _ in $(seq "$rounds"); do
  timeit py $py scripts/speed/grid.py
  timeit go "$d/fringe" run "$grid" -out "$d/run" -workers "$workers" -quiet -fresh
  timeit nofig "$d/fringe" run "$grid" -out "$d/run2" -workers "$workers" -quiet -fresh -figures=false
  if [[ "$workers" -gt 1 ]]; then
    timeit one "$d/fringe" run "$grid" -out "$d/run3" -workers 1 -quiet -fresh
  fi
done
py_t=$(median < "$d/py.times")
printf 'python (numpy %s, scikit-learn %s): %.3f s (median of %d)\n' \
  "$($py -c 'import numpy; print(numpy.__version__)')" "$($py -c 'import sklearn; print(sklearn.__version__)')" "$py_t" "$rounds"
printf 'fringe -workers %s, whole run directory with figures: %.3f s, ratio %.1fx (median of %d rounds)\n' \
  "$workers" "$(median < "$d/go.times")" "$(ratios go)" "$rounds"
printf 'fringe -workers %s -figures=false: %.3f s, ratio %.1fx\n' "$workers" "$(median < "$d/nofig.times")" "$(ratios nofig)"
if [[ "$workers" -gt 1 ]]; then
  printf 'fringe -workers 1, whole run directory with figures: %.3f s, ratio %.1fx; %s workers are %.2fx faster than 1\n' \
    "$(median < "$d/one.times")" "$(ratios one)" "$workers" \
    "$(paste "$d/one.times" "$d/go.times" | awk '{print $1/$2}' | median)"
fi
