#!/usr/bin/env bash
# Times the same grid in Python (numpy + scikit-learn, scripts/speed/grid.py)
# and in fringe (scripts/speed/grid.toml) in one run, start-up and data
# loading included, and prints the speed ratio. Each side runs 3 times; the
# median wall time counts. fringe is built first (build time excluded).
# usage: scripts/speed/ratio.sh [WORKERS]   (default 2)
set -euo pipefail
cd "$(dirname "$0")/../.."
workers=${1:-2}
py=/usr/bin/python3
$py -c 'import sklearn' 2>/dev/null || { echo "needs Debian's python3-sklearn (apt-get install python3-sklearn)"; exit 2; }
d=$(mktemp -d); trap 'rm -rf "$d"' EXIT
go build -o "$d/fringe" ./bench/cmd/fringe
now() { date +%s.%N; }
median() { sort -g | sed -n 2p; }
for i in 1 2 3; do
  s=$(now); $py scripts/speed/grid.py > "$d/py.txt" 2>/dev/null; e=$(now)
  awk -v a="$s" -v b="$e" 'BEGIN{print b-a}' >> "$d/py.times"
  s=$(now); "$d/fringe" run scripts/speed/grid.toml -out "$d/run" -workers "$workers" -quiet; e=$(now)
  awk -v a="$s" -v b="$e" 'BEGIN{print b-a}' >> "$d/go.times"
done
py_t=$(median < "$d/py.times"); go_t=$(median < "$d/go.times")
printf 'python (numpy %s, scikit-learn %s): %.3f s (median of 3)\n' \
  "$($py -c 'import numpy; print(numpy.__version__)')" "$($py -c 'import sklearn; print(sklearn.__version__)')" "$py_t"
printf 'fringe -workers %s: %.3f s (median of 3)\n' "$workers" "$go_t"
printf 'speed ratio (python / fringe): %.1fx\n' "$(awk -v a="$py_t" -v b="$go_t" 'BEGIN{print a/b}')"
