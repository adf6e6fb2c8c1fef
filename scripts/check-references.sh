#!/usr/bin/env bash
# Reruns every reference script with Debian's python3 (scikit-learn 1.2.1,
# numpy, scipy) and fails if a committed fixture changes. Run from anywhere.
set -euo pipefail
cd "$(dirname "$0")/.."
py=/usr/bin/python3
# OpenBLAS picks its kernels by CPU at run time, and kernels for different
# instruction sets round differently in the last bit (seen: the AVX-512
# kernels change 107 of the SVM fixture's numbers against the AVX2 ones).
# The fixtures are written with the AVX2 ("Haswell") kernels, which every
# x86-64 machine with AVX2 runs; set OPENBLAS_CORETYPE yourself to override.
export OPENBLAS_CORETYPE=${OPENBLAS_CORETYPE:-Haswell}
$py -c 'import sklearn, numpy, scipy' || { echo "needs Debian's python3-sklearn (apt-get install python3-sklearn)"; exit 2; }
for s in scripts/ref_*.py; do  # includes ref_compare.py
  echo "-- $s"
  $py "$s" > /dev/null
done
if ! git diff --exit-code --stat -- '*/testdata/*' '*/*/testdata/*'; then
  echo "a reference fixture changed when its script was rerun (see the diff above)"
  exit 1
fi
echo "all reference fixtures reproduced byte for byte"
