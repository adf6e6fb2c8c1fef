#!/usr/bin/env bash
# Compile a fringe summary.tex inside a minimal document with pdflatex.
# usage: scripts/check-latex.sh path/to/summary.tex
set -euo pipefail
tex=$(readlink -f "$1")
d=$(mktemp -d)
trap 'rm -rf "$d"' EXIT
cat > "$d/doc.tex" <<TEX
\documentclass{article}
\usepackage[margin=1.5cm]{geometry}
\usepackage{booktabs}
\begin{document}
\input{$tex}
\end{document}
TEX
(cd "$d" && pdflatex -interaction=nonstopmode -halt-on-error doc.tex > log.txt 2>&1) || { tail -n 30 "$d/log.txt"; echo "pdflatex failed on $1"; exit 1; }
echo "pdflatex compiled $1 ($(stat -c %s "$d/doc.pdf") bytes of PDF)"
