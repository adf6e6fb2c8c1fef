#!/usr/bin/env bash
# Scaling of every model with the rows, fringe against scikit-learn 1.2.1 on
# the same folds.
#
# Data: scripts/speed/scaledata (invented near-infrared spectra of plastic
# flakes, 16 bands), with 2 classes (PET or not) and 10 (polymers), at each
# size in SIZES rows. Protocol: pipeline std+l2, stratified 5-fold CV
# (seed 7), one model at a time: the exact interference classifier, k-NN
# (k = 5), RBF SVM (C = 1, gamma "inverse-variance", scikit-learn's "scale") and logistic regression (C = 1);
# on fringe's side also k-NN forced to brute force (search = "brute"), the
# reference of its default search (a k-d tree where its probe says it pays).
#
# Each model runs alone, on one core on both sides (fringe -workers 1 with
# GOMAXPROCS=1; Python with OPENBLAS_NUM_THREADS=1 and OMP_NUM_THREADS=1, as
# scikit-learn runs with n_jobs=None). A model's time is the sum over the
# folds of the pipeline fit, the model fit and the prediction: fringe's
# timings.csv, Python's time.perf_counter around the same steps
# (scripts/speed/scale.py, which reads the folds from fringe's
# predictions.csv). Start-up and data loading are not in these times.
# The growth exponent is the least-squares slope of log(time) against
# log(rows) over the sizes.
#
# Then, at the largest size, the whole run (four models in one spec,
# whole run directory with figures) with 1 and with 2 workers: wall time,
# the speed-up of 2 workers, and the peak resident set (/usr/bin/time -v,
# Debian package "time").
#
# usage: scripts/speed/scale.sh                 (SIZES="2000 8000 32000 50000", CLASSES="2 10")
#        SIZES="2000 8000" CLASSES=10 scripts/speed/scale.sh
set -euo pipefail
cd "$(dirname "$0")/../.."
root=$(pwd)
sizes=${SIZES:-"2000 8000 32000 50000"}
classes=${CLASSES:-"2 10"}
py=/usr/bin/python3
$py -c 'import sklearn' 2>/dev/null || { echo "needs Debian's python3-sklearn (apt-get install python3-sklearn)"; exit 2; }
[[ -x /usr/bin/time ]] || { echo "needs /usr/bin/time (apt-get install time)"; exit 2; }
d=$(mktemp -d); trap 'rm -rf "$d"' EXIT
go build -o "$d/fringe" ./bench/cmd/fringe
go build -o "$d/scaledata" ./scripts/speed/scaledata
export OPENBLAS_NUM_THREADS=1 OMP_NUM_THREADS=1

model_toml() { # kind
  case $1 in
  interference) printf '[[model]]\nkind = "interference"\n' ;;
  knn) printf '[[model]]\nkind = "knn"\nk = 5\n' ;;
  knnbrute) printf '[[model]]\nkind = "knn"\nk = 5\nsearch = "brute"\nname = "knn-brute"\n' ;;
  svm) printf '[[model]]\nkind = "svm"\nkernel = "rbf"\nC = 1.0\ngamma = "inverse-variance"\n' ;;
  logreg) printf '[[model]]\nkind = "logreg"\nC = 1.0\n' ;;
  esac
}
model_name() {
  case $1 in
  interference) echo interference ;; knn) echo knn-k5 ;; knnbrute) echo knn-brute ;; svm) echo svm-rbf-C1 ;; logreg) echo logreg-C1 ;;
  esac
}
spec() { # name csv kinds...
  local name=$1 csv=$2 m; shift 2
  printf 'name = "%s"\nseed = 7\ndatasets = ["%s"]\npipelines = ["std+l2"]\n\n[cv]\nmethod = "stratified"\nfolds = 5\nrepeats = 1\n\n' "$name" "$csv"
  for m in "$@"; do model_toml "$m"; echo; done
}

: > "$d/rows.txt"
for k in $classes; do
  for n in $sizes; do
    csv="$d/flakes-$k-$n.csv"
    "$d/scaledata" -rows "$n" -classes "$k" -out "$csv"
    for m in interference knn knnbrute svm logreg; do
      name=$(model_name $m)
      spec "s$k-$n-$m" "$csv" "$m" > "$d/s.toml"
      GOMAXPROCS=1 "$d/fringe" run "$d/s.toml" -out "$d/run" -workers 1 -quiet -fresh -figures=false > /dev/null
      go_s=$(awk -F, 'NR > 1 {s += $6} END {printf "%.3f", s}' "$d/run/timings.csv")
      go_acc=$(awk -F, 'NR == 2 {print $6}' "$d/run/summary.csv")
      if [[ $m == knnbrute ]]; then
        # fringe's k-NN forced to brute force: the reference of its k-d tree.
        py_s=nan py_acc=nan
      else
        read -r _ py_s py_acc < <($py scripts/speed/scale.py "$csv" "$d/run/predictions.csv" "$name")
      fi
      echo "$m $k $n $go_s $py_s $go_acc $py_acc" | tee -a "$d/rows.txt" >&2
    done
  done
done

printf '\nper model, one core each side, seconds summed over 5 folds (fit + predict, pipeline included)\n'
printf '%-13s %7s %7s %10s %12s %7s %9s %9s\n' model classes rows fringe_s sklearn_s ratio acc_fr acc_sk
awk '{if ($5 == "nan") printf "%-13s %7s %7s %10.3f %12s %7s %9.4f %9s\n", $1, $2, $3, $4, "-", "-", $6, "-";
      else printf "%-13s %7s %7s %10.3f %12.3f %7.1f %9.4f %9.4f\n", $1, $2, $3, $4, $5, $5/$4, $6, $7}' "$d/rows.txt"
printf '\nk-NN: the default search (k-d tree where its probe pays, else brute force) against brute force, fringe\n'
printf '%7s %7s %10s %10s %7s\n' classes rows auto_s brute_s brute/auto
awk '$1 == "knn" {a[$2 " " $3] = $4} $1 == "knnbrute" {printf "%7s %7s %10.3f %10.3f %7.2f\n", $2, $3, a[$2 " " $3], $4, $4/a[$2 " " $3]}' "$d/rows.txt"
printf '\ngrowth exponent (least-squares slope of log time against log rows over %s rows)\n' "$sizes"
printf '%-13s %7s %8s %8s\n' model classes fringe sklearn
awk '{key = $1 " " $2; if (!(key in seen)) {seen[key] = 1; order[++n] = key}
      x = log($3); nn[key]++; sx[key] += x; sxx[key] += x*x; sy[key] += log($4); sxy[key] += x*log($4); sz[key] += log($5); sxz[key] += x*log($5)}
     END {for (i = 1; i <= n; i++) {k = order[i]; split(k, p, " "); den = nn[k]*sxx[k] - sx[k]^2
          if (den == 0) continue
          if (p[1] == "knnbrute") {printf "%-13s %7s %8.2f %8s\n", p[1], p[2], (nn[k]*sxy[k] - sx[k]*sy[k])/den, "-"; continue}
          printf "%-13s %7s %8.2f %8.2f\n", p[1], p[2], (nn[k]*sxy[k] - sx[k]*sy[k])/den, (nn[k]*sxz[k] - sx[k]*sz[k])/den}}' "$d/rows.txt"

big=$(echo $sizes | tr ' ' '\n' | sort -g | tail -1)
printf '\nwhole run at %s rows (four models, 5 folds, whole run directory with figures)\n' "$big"
for k in $classes; do
  csv="$d/flakes-$k-$big.csv"
  spec "all$k" "$csv" interference knn svm logreg > "$d/all.toml"
  for w in 1 2; do
    /usr/bin/time -v "$d/fringe" run "$d/all.toml" -out "$d/all" -workers "$w" -quiet -fresh > /dev/null 2> "$d/time.txt"
    wall=$(awk -F': ' '/Elapsed \(wall clock\)/ {n = split($2, t, ":"); s = 0; for (i = 1; i <= n; i++) s = s*60 + t[i]; print s}' "$d/time.txt")
    rss=$(awk -F': ' '/Maximum resident set size/ {printf "%.0f", $2/1024}' "$d/time.txt")
    echo "$k $w $wall $rss" >> "$d/all.txt"
    printf '%2s classes, -workers %s: %7.1f s, peak resident set %5s MiB\n' "$k" "$w" "$wall" "$rss"
  done
done
awk '{t[$1 " " $2] = $3} END {for (k in t) {split(k, p, " "); if (p[2] == 1 && ((p[1] " 2") in t)) printf "%2s classes: 2 workers are %.2fx faster than 1\n", p[1], t[k]/t[p[1] " 2"]}}' "$d/all.txt" | sort -n
