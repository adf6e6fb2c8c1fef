#!/usr/bin/env bash
# Reruns every reference script with Debian's python3 (scikit-learn 1.2.1,
# numpy, scipy) and fails if a committed fixture changes. Run from anywhere.
set -euo pipefail
cd "$(dirname "$0")/.."
py=/usr/bin/python3
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
