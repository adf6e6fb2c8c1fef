#!/usr/bin/env bash
# Compile a fringe LaTeX output with pdflatex and check its layout.
#
# usage: scripts/check-latex.sh FILE.tex [FILE.tex ...]
#
# FILE is a complete document (summary-standalone.tex, which \input's
# summary.tex from its own directory) or a bare table file (summary.tex,
# assess.tex), which is wrapped in a minimal article that loads the
# packages fringe's tables use. pdflatex runs until longtable's column
# widths settle (at most four times); the script fails when pdflatex
# fails, or when the last log holds an "Overfull \hbox" of more than 1 pt
# or a "Float too large", and prints those lines.
set -euo pipefail
[ $# -ge 1 ] || { echo "usage: $0 FILE.tex [FILE.tex ...]" >&2; exit 2; }
command -v pdflatex >/dev/null || { echo "pdflatex not found (apt-get install texlive-latex-recommended)" >&2; exit 2; }

status=0
for arg in "$@"; do
  tex=$(readlink -f "$arg")
  [ -f "$tex" ] || { echo "$arg: no such file" >&2; exit 2; }
  src=$(dirname "$tex")
  d=$(mktemp -d)
  trap 'rm -rf "$d"' EXIT
  if grep -q '\\documentclass' "$tex"; then
    doc="$tex"
  else
    doc="$d/doc.tex"
    cat > "$doc" <<TEX
\documentclass{article}
\usepackage{array,booktabs,dcolumn,longtable,pdflscape}
\begin{document}
\input{$tex}
\end{document}
TEX
  fi
  name=$(basename "$doc" .tex)
  log="$d/$name.log"
  for run in 1 2 3 4; do
    if ! (cd "$src" && TEXINPUTS="$src:" pdflatex -interaction=nonstopmode -halt-on-error \
        -output-directory="$d" "$doc" > "$d/out.txt" 2>&1); then
      tail -n 30 "$d/out.txt"
      echo "pdflatex failed on $arg"
      exit 1
    fi
    grep -q -e 'Rerun LaTeX' -e 'Table widths have changed' "$log" || break
  done
  # Overfull boxes over 1 pt and floats too large for their page.
  bad=$(awk '
    /Overfull \\hbox \(/ {
      s = $0; sub(/.*Overfull \\hbox \(/, "", s); sub(/pt too wide.*/, "", s)
      if (s + 0 > 1) print
    }
    /Float too large/ { print }
  ' "$log")
  if [ -n "$bad" ]; then
    echo "$arg: layout problems in the pdflatex log:"
    echo "$bad"
    status=1
  else
    pages=$(grep -o 'Output written on .* (\([0-9]*\) page' "$log" | grep -o '([0-9]*' | tr -d '(' || true)
    echo "pdflatex compiled $arg: ${pages:-?} pages, no overfull box over 1 pt, no float too large"
  fi
  rm -rf "$d"
  trap - EXIT
done
exit $status
