#!/usr/bin/env python3
"""An external classifier for fringe: 1-nearest neighbour, standard library only.

fringe runs it once per task (a model entry of kind "command"):

    [[model]]
    kind = "command"
    name = "my-1nn"
    run = ["python3", "scripts/example_classifier.py"]
    timeout = 60

and appends three paths to the command line:

    TRAIN  CSV with header row,label,<feature names>: the training part of
           the split, after the task's pipeline
    TEST   CSV with header row,<feature names>: the test part
    OUT    the CSV this program writes: header row,predicted and,
           optionally, prob_<class> columns (a class without one gets
           probability 0)

`row` is the instance's 0-based row in the dataset; `label` and `predicted`
are class names. Feature values are written so that float() reads back
exactly the numbers fringe holds. The environment variable FRINGE_SEED
carries the task's seed (decimal) for programs that draw random numbers;
this one draws none. A non-zero exit status, a missing or repeated test
row, or an unknown class fails the run, and fringe quotes the last lines
of standard error.

The rule is the one of fringe's `knn` with k = 1 (Euclidean distance;
among training rows at the same distance the first one in TRAIN wins), so
both give the same predictions on the same folds. (With fewer than eight
features both sum the squared differences in feature order and agree bit
for bit; with more, fringe sums in four partial sums, and two rows whose
distances differ only by rounding may be ordered differently.)
"""

import csv
import sys


def read(path, labelled):
    with open(path, newline="") as f:
        reader = csv.reader(f)
        header = next(reader)
        skip = 2 if labelled else 1
        rows, labels, vectors = [], [], []
        for rec in reader:
            if not rec:
                continue
            rows.append(rec[0])
            if labelled:
                labels.append(rec[1])
            vectors.append([float(v) for v in rec[skip:]])
    return header, rows, labels, vectors


def main(argv):
    if len(argv) != 4:
        sys.stderr.write("usage: example_classifier.py TRAIN TEST OUT\n")
        return 2
    _, train_path, test_path, out_path = argv
    _, _, labels, train = read(train_path, labelled=True)
    _, test_rows, _, test = read(test_path, labelled=False)
    if not train:
        sys.stderr.write("no training rows in %s\n" % train_path)
        return 1
    classes = []  # in order of first appearance in TRAIN
    for c in labels:
        if c not in classes:
            classes.append(c)
    with open(out_path, "w", newline="") as f:
        out = csv.writer(f, lineterminator="\n")
        out.writerow(["row", "predicted"] + ["prob_" + c for c in classes])
        for row, x in zip(test_rows, test):
            best, best_d = 0, None
            for i, t in enumerate(train):
                d = 0.0
                for a, b in zip(x, t):
                    d += (a - b) * (a - b)
                if best_d is None or d < best_d:
                    best, best_d = i, d
            pred = labels[best]
            out.writerow([row, pred] + ["1" if c == pred else "0" for c in classes])
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv))
