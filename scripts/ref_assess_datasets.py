#!/usr/bin/python3
"""Convert the open datasets added for `fringe assess` into fringe's embedded
format and write the fixture the Go tests check them against.

Sources (Debian bookworm packages; the exact versions are pinned below and
recorded in the fixture):

  digits      python3-sklearn 1.2.1+dfsg-1 (installed), datasets/data/digits.csv.gz
              copied byte for byte, with descr/digits.rst
  glass       weka 3.6.14-3, /usr/share/doc/weka/examples/glass.arff
  ionosphere  weka 3.6.14-3, /usr/share/doc/weka/examples/ionosphere.arff
  segment     weka 3.6.14-3, segment-challenge.arff + segment-test.arff
  penguins    r-cran-palmerpenguins 0.1.1-1, extdata/penguins.csv
  cats        r-cran-mass 7.3-58.2-1, data/Rdata.rdb (object "cats"), read
              by the small reader of R's serialization format below

The .deb files are fetched with `apt-get download PKG=VERSION` into a
temporary folder and unpacked with `dpkg -x` (nothing is installed), unless
--debs DIR names a folder that already holds them. Every converted file is
written in the format of scikit-learn's data folder that datasets.loadBundled
reads: a first line "n,d,class names..." and n lines "features...,class code".
Feature values are copied as the source spells them (ARFF and CSV tokens
verbatim); the R doubles of cats are written with Python's repr, the shortest
text that reads back to the same float64.

Usage:
  /usr/bin/python3 scripts/ref_assess_datasets.py [--debs DIR]

Writes datasets/data/{digits.csv.gz,glass.csv,ionosphere.csv,segment.csv,
penguins.csv,cats.csv}, datasets/data/descr/digits.rst and
datasets/testdata/assess_datasets.json (shapes, class names and counts,
numpy summary statistics, digests of the float64 matrices, sha256 of every
source and converted file, library versions).
"""

import argparse
import bz2
import csv
import glob
import gzip
import hashlib
import io
import json
import lzma
import os
import shutil
import struct
import subprocess
import sys
import tempfile
import zlib

import numpy as np

ROOT = os.path.dirname(os.path.dirname(os.path.abspath(__file__)))
DATA = os.path.join(ROOT, "datasets", "data")
FIXTURE = os.path.join(ROOT, "datasets", "testdata", "assess_datasets.json")

PACKAGES = {
    "weka": "3.6.14-3",
    "r-cran-palmerpenguins": "0.1.1-1",
    "r-cran-mass": "7.3-58.2-1",
}
SKLEARN_DATA = "/usr/lib/python3/dist-packages/sklearn/datasets"


def sha256_bytes(b):
    return hashlib.sha256(b).hexdigest()


def sha256_file(path):
    with open(path, "rb") as f:
        return sha256_bytes(f.read())


def unpack_debs(debdir, tmp):
    """Fetch (unless present) and unpack the pinned packages into tmp/root;
    return the root."""
    root = os.path.join(tmp, "root")
    os.makedirs(root)
    for pkg, ver in PACKAGES.items():
        found = glob.glob(os.path.join(debdir, "%s_%s_*.deb" % (pkg, ver.replace(":", "%3a"))))
        if not found:
            r = subprocess.run(["apt-get", "download", "%s=%s" % (pkg, ver)], cwd=debdir,
                               stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, text=True)
            if r.returncode != 0:
                # The archive serves only current versions; when a pinned
                # one is gone the conversion cannot be reproduced here.
                # Nothing is written, so the committed files stay as they are.
                print("skipped: apt-get download %s=%s failed: %s" % (pkg, ver, r.stderr.strip()))
                sys.exit(0)
            found = glob.glob(os.path.join(debdir, "%s_%s_*.deb" % (pkg, ver)))
        if len(found) != 1:
            sys.exit("cannot find the .deb of %s %s in %s" % (pkg, ver, debdir))
        subprocess.run(["dpkg", "-x", found[0], root], check=True)
    return root


# ---------------------------------------------------------------- ARFF

def read_arff(path):
    """Return (attribute names, class values in declared order, rows of
    feature tokens, class tokens) of an ARFF file whose last attribute is
    the nominal class and every other attribute numeric."""
    names, classes, rows, labels = [], None, [], []
    in_data = False
    with open(path, encoding="latin-1") as f:
        for lineno, line in enumerate(f, 1):
            s = line.strip()
            if not s or s.startswith("%"):
                continue
            low = s.lower()
            if not in_data:
                if low.startswith("@attribute"):
                    rest = s[len("@attribute"):].strip()
                    if rest.endswith("}"):
                        name, _, vals = rest.partition("{")
                        classes = [v.strip().strip("'") for v in vals[:-1].split(",")]
                        names.append(name.strip().strip("'"))
                    else:
                        name, typ = rest.rsplit(None, 1)
                        if typ.lower() not in ("numeric", "real"):
                            sys.exit("%s:%d: attribute type %s" % (path, lineno, typ))
                        names.append(name.strip().strip("'"))
                elif low.startswith("@data"):
                    in_data = True
                continue
            toks = [t.strip() for t in s.split(",")]
            if len(toks) != len(names):
                sys.exit("%s:%d: %d fields for %d attributes" % (path, lineno, len(toks), len(names)))
            for t in toks[:-1]:
                float(t)  # every feature token must be a number
            rows.append(toks[:-1])
            labels.append(toks[-1].strip("'"))
    return names[:-1], classes, rows, labels


# ------------------------------------------------- R serialization (XDR)
# The format is documented in "R Internals", section "Serialization
# formats"; lazy-load databases in section "Lazy loading". Only what a
# data frame of numbers and one factor needs is read.

class RReader:
    def __init__(self, b):
        self.b, self.p, self.refs = b, 0, []

    def int(self):
        v = struct.unpack(">i", self.b[self.p:self.p + 4])[0]
        self.p += 4
        return v

    def header(self):
        if self.b[:2] != b"X\n":
            raise ValueError("not an XDR serialization")
        self.p = 2
        version = self.int()
        self.int()  # writer version
        self.int()  # minimal reader version
        if version == 3:
            n = self.int()
            self.p += n  # native encoding

    def item(self):
        flags = self.int()
        t = flags & 0xFF
        has_attr, has_tag = flags & (1 << 9), flags & (1 << 10)
        if t == 254:  # NILVALUE_SXP
            return None
        if t in (241, 242, 253):  # base, empty, global environment
            return ("ENV", t)
        if t == 255:  # REFSXP
            idx = flags >> 8 or self.int()
            return self.refs[idx - 1]
        if t == 247:  # PERSISTSXP
            self.int()
            n = self.int()
            v = ("PERSIST", [self.item() for _ in range(n)])
            self.refs.append(v)
            return v
        if t == 1:  # SYMSXP
            v = ("SYM", self.item())
            self.refs.append(v)
            return v
        if t in (2, 6, 17):  # pairlist, language, dots
            attr = self.item() if has_attr else None
            tag = self.item() if has_tag else None
            return ("LIST", tag, self.item(), self.item(), attr)
        if t == 9:  # CHARSXP
            n = self.int()
            if n == -1:
                return None
            s = self.b[self.p:self.p + n].decode("utf-8")
            self.p += n
            return s
        if t in (10, 13):  # logical, integer
            n = self.int()
            v = list(struct.unpack(">%di" % n, self.b[self.p:self.p + 4 * n]))
            self.p += 4 * n
        elif t == 14:  # double
            n = self.int()
            v = list(struct.unpack(">%dd" % n, self.b[self.p:self.p + 8 * n]))
            self.p += 8 * n
        elif t in (16, 19, 20):  # character, list, expression
            n = self.int()
            v = [self.item() for _ in range(n)]
        else:
            raise ValueError("R type %d not supported (offset %d)" % (t, self.p))
        attr = self.item() if has_attr else None
        return ("V", t, v, pairlist(attr))


def pairlist(x):
    out = {}
    while x is not None and x[0] == "LIST":
        out[x[1][1] if x[1] else None] = x[2]
        x = x[3]
    return out


def unserialize(b):
    r = RReader(b)
    r.header()
    return r.item()


def lazyload(rdx, rdb, name):
    """Return the serialized bytes of object name of a lazy-load database."""
    with open(rdx, "rb") as f:
        index = unserialize(gzip.decompress(f.read()))
    top = dict(zip(index[3]["names"][2], index[2]))
    comp = top["compressed"][2][0]
    variables = top["variables"]
    for nm, loc in zip(variables[3]["names"][2], variables[2]):
        if nm != name:
            continue
        off, ln = (int(v) for v in loc[2])
        with open(rdb, "rb") as f:
            f.seek(off)
            chunk = f.read(ln)
        if comp in (1, True):
            return zlib.decompress(chunk[4:])
        method = chunk[4:5]
        return {b"Z": zlib.decompress, b"2": bz2.decompress, b"X": lzma.decompress, b"0": lambda c: c}[method](chunk[5:])
    sys.exit("%s has no object %s" % (rdb, name))


# ------------------------------------------------------------- writing

def write_bundled(path, classes, rows, codes):
    """Write the embedded format: "n,d,class names", then rows."""
    d = len(rows[0])
    lines = ["%d,%d,%s" % (len(rows), d, ",".join(classes))]
    for toks, c in zip(rows, codes):
        if len(toks) != d:
            raise ValueError("ragged row")
        lines.append(",".join(toks + [str(c)]))
    data = ("\n".join(lines) + "\n").encode("ascii")
    with open(path, "wb") as f:
        f.write(data)
    return data


def matrix_digest(X):
    return sha256_bytes(np.ascontiguousarray(X, dtype="<f8").tobytes())


def target_digest(y):
    return sha256_bytes(np.ascontiguousarray(y, dtype="<u8").tobytes())


def summary(name, X, y, classes, features, extra):
    counts = np.bincount(y, minlength=len(classes))
    out = {
        "name": name,
        "shape": list(X.shape),
        "classes": classes,
        "class_counts": [int(c) for c in counts],
        "features": features,
        "mean": X.mean(axis=0).tolist(),
        "std_ddof0": X.std(axis=0, ddof=0).tolist(),
        "min": X.min(axis=0).tolist(),
        "max": X.max(axis=0).tolist(),
        "data_sha256": matrix_digest(X),
        "target_sha256": target_digest(y),
    }
    out.update(extra)
    return out


def from_tokens(rows):
    return np.array([[float(t) for t in r] for r in rows], dtype=np.float64)


def main():
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("--debs", help="folder holding (or receiving) the .deb files")
    args = ap.parse_args()
    tmp = tempfile.mkdtemp(prefix="fringe-assess-")
    try:
        debdir = args.debs or os.path.join(tmp, "debs")
        os.makedirs(debdir, exist_ok=True)
        convert(unpack_debs(debdir, tmp))
    finally:
        shutil.rmtree(tmp)


def convert(root):
    weka = os.path.join(root, "usr/share/doc/weka/examples")
    sets = []

    # digits: byte for byte from python3-sklearn.
    src = os.path.join(SKLEARN_DATA, "data", "digits.csv.gz")
    shutil.copyfile(src, os.path.join(DATA, "digits.csv.gz"))
    shutil.copyfile(os.path.join(SKLEARN_DATA, "descr", "digits.rst"), os.path.join(DATA, "descr", "digits.rst"))
    raw = np.loadtxt(src, delimiter=",")  # as sklearn.datasets.load_digits reads it
    X, y = raw[:, :-1], raw[:, -1].astype(int)
    sets.append(summary("digits", X, y, [str(k) for k in range(10)], ["pixel_%d_%d" % (i // 8, i % 8) for i in range(64)], {
        "source_package": "python3-sklearn 1.2.1+dfsg-1",
        "source_files": [{"path": src, "sha256": sha256_file(src)}],
        "file": "digits.csv.gz", "file_sha256": sha256_file(os.path.join(DATA, "digits.csv.gz")),
        "descr_sha256": sha256_file(os.path.join(DATA, "descr", "digits.rst")),
    }))

    def arff_set(name, files, drop_empty):
        feats, classes, rows, labels = None, None, [], []
        srcs = []
        for fn in files:
            p = os.path.join(weka, fn)
            f2, c2, r2, l2 = read_arff(p)
            if feats is not None and (f2 != feats or c2 != classes):
                sys.exit("%s: attributes differ from %s" % (fn, files[0]))
            feats, classes = f2, c2
            rows += r2
            labels += l2
            srcs.append({"path": "/usr/share/doc/weka/examples/" + fn, "sha256": sha256_file(p)})
        dropped = []
        if drop_empty:
            dropped = [c for c in classes if c not in labels]
            classes = [c for c in classes if c in labels]
        codes = [classes.index(l) for l in labels]
        data = write_bundled(os.path.join(DATA, name + ".csv"), classes, rows, codes)
        X = from_tokens(rows)
        sets.append(summary(name, X, np.array(codes), classes, feats, {
            "source_package": "weka " + PACKAGES["weka"],
            "source_files": srcs, "file": name + ".csv", "file_sha256": sha256_bytes(data),
            "dropped_classes": dropped,
        }))

    arff_set("glass", ["glass.arff"], True)
    arff_set("ionosphere", ["ionosphere.arff"], False)
    arff_set("segment", ["segment-challenge.arff", "segment-test.arff"], False)

    # penguins: the four measurements; rows with a missing one are dropped.
    p = os.path.join(root, "usr/lib/R/site-library/palmerpenguins/extdata/penguins.csv")
    with open(p, newline="") as f:
        recs = list(csv.reader(f))
    head = recs[0]
    feats = ["bill_length_mm", "bill_depth_mm", "flipper_length_mm", "body_mass_g"]
    cols = [head.index(c) for c in feats]
    si = head.index("species")
    classes, rows, codes, dropped = [], [], [], []
    for i, r in enumerate(recs[1:]):
        toks = [r[c] for c in cols]
        if any(t == "NA" for t in toks):
            dropped.append(i)
            continue
        if r[si] not in classes:
            classes.append(r[si])
        rows.append(toks)
        codes.append(classes.index(r[si]))
    data = write_bundled(os.path.join(DATA, "penguins.csv"), classes, rows, codes)
    sets.append(summary("penguins", from_tokens(rows), np.array(codes), classes, feats, {
        "source_package": "r-cran-palmerpenguins " + PACKAGES["r-cran-palmerpenguins"],
        "source_files": [{"path": "/usr/lib/R/site-library/palmerpenguins/extdata/penguins.csv", "sha256": sha256_file(p)}],
        "file": "penguins.csv", "file_sha256": sha256_bytes(data),
        "dropped_rows": dropped, "source_rows": len(recs) - 1,
    }))

    # cats: MASS's data frame (Sex factor, Bwt, Hwt).
    base = os.path.join(root, "usr/lib/R/library/MASS/data/Rdata")
    obj = unserialize(lazyload(base + ".rdx", base + ".rdb", "cats"))
    names = obj[3]["names"][2]
    cols = dict(zip(names, obj[2]))
    sex = cols["Sex"]
    classes = sex[3]["levels"][2]
    codes = [c - 1 for c in sex[2]]  # R factor codes are 1-based
    feats = ["Bwt", "Hwt"]
    rows = [[repr(cols["Bwt"][2][i]), repr(cols["Hwt"][2][i])] for i in range(len(codes))]
    data = write_bundled(os.path.join(DATA, "cats.csv"), classes, rows, codes)
    X = np.column_stack([cols["Bwt"][2], cols["Hwt"][2]])
    sets.append(summary("cats", X, np.array(codes), classes, feats, {
        "source_package": "r-cran-mass " + PACKAGES["r-cran-mass"],
        "source_files": [
            {"path": "/usr/lib/R/library/MASS/data/Rdata.rdb", "sha256": sha256_file(base + ".rdb")},
            {"path": "/usr/lib/R/library/MASS/data/Rdata.rdx", "sha256": sha256_file(base + ".rdx")},
        ],
        "file": "cats.csv", "file_sha256": sha256_bytes(data),
        "r_object": "cats", "r_columns": names,
    }))

    fixture = {
        "generated_by": "scripts/ref_assess_datasets.py",
        "numpy": np.__version__,
        "python": sys.version.split()[0],
        "packages": PACKAGES,
        "datasets": sets,
    }
    with open(FIXTURE, "w") as f:
        json.dump(fixture, f, indent=1, sort_keys=True)
        f.write("\n")
    for s in sets:
        print("%-11s %4d x %-2d %s %s" % (s["name"], s["shape"][0], s["shape"][1], s["classes"], s["class_counts"]))


if __name__ == "__main__":
    main()
