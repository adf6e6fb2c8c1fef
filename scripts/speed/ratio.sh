#!/usr/bin/env bash
# Times the same grid in Python (numpy + scikit-learn, scripts/speed/grid.py)
# and in fringe (scripts/speed/grid.toml) in one run, start-up and data
# loading included, and prints the speed ratio. Each side runs 3 times; the
# median wall time counts. fringe is built first (build time excluded).
# fringe is timed twice: writing its whole run directory (CSV, LaTeX,
# Markdown, significance tests and figures in SVG, PDF and PNG), and with
# -figures=false (tables and CSV files only). The Python script computes the
# same grid and prints mean accuracies; it writes no files.
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
  s=$(now); "$d/fringe" run scripts/speed/grid.toml -out "$d/run" -workers "$workers" -quiet -fresh; e=$(now)
  awk -v a="$s" -v b="$e" 'BEGIN{print b-a}' >> "$d/go.times"
  s=$(now); "$d/fringe" run scripts/speed/grid.toml -out "$d/run2" -workers "$workers" -quiet -fresh -figures=false; e=$(now)
  awk -v a="$s" -v b="$e" 'BEGIN{print b-a}' >> "$d/go2.times"
done
py_t=$(median < "$d/py.times"); go_t=$(median < "$d/go.times"); go2_t=$(median < "$d/go2.times")
printf 'python (numpy %s, scikit-learn %s): %.3f s (median of 3)\n' \
  "$($py -c 'import numpy; print(numpy.__version__)')" "$($py -c 'import sklearn; print(sklearn.__version__)')" "$py_t"
printf 'fringe -workers %s, whole run directory with figures: %.3f s (median of 3), ratio %.1fx\n' "$workers" "$go_t" "$(awk -v a="$py_t" -v b="$go_t" 'BEGIN{print a/b}')"
printf 'fringe -workers %s -figures=false: %.3f s (median of 3), ratio %.1fx\n' "$workers" "$go2_t" "$(awk -v a="$py_t" -v b="$go2_t" 'BEGIN{print a/b}')"
