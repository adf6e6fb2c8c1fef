package report

import (
	"cmp"
	"fmt"
	"math"
	"slices"
	"strings"

	"gonum.org/v1/gonum/stat/distuv"

	"fringe/bench/input"
	"fringe/bench/spec"
	"fringe/bench/stats"
	"fringe/results"
)

// CompareOptions configure Compare. The zero value gates accuracy at
// alpha 0.05 with no tolerance and Holm's correction.
type CompareOptions struct {
	Alpha     float64  // significance level; 0 means spec.DefaultTestAlpha
	Tolerance float64  // drops up to this much (in metric units) never count as regressions; ≥ 0
	Metrics   []string // metrics that may flag a regression; nil means accuracy only
	Models    []string // models whose cells may flag a regression; nil means every model
	// NoCorrection turns Holm's correction over the gated tests off.
	NoCorrection bool
}

// Compare compares a new run with a baseline run, cell by cell (cells
// matched by dataset, pipeline and model name), for every metric: the
// change of the mean (new − baseline), its interval at 1 − alpha, and a
// test of no change.
//
// How a cell is tested depends on its protocol (the summary's interval
// column) and on whether both runs used the same splits:
//
//   - k-fold or repeated holdout (corrected-t), same splits: the
//     corrected resampled t-test on the fold scores paired by (repeat,
//     fold), with the corrected interval of the paired differences
//     (Nadeau & Bengio 2003).
//   - k-fold, different splits: an unpaired Welch-type t-test on the two
//     corrected standard errors, SE² = SE_new² + SE_base², with the
//     Welch–Satterthwaite degrees of freedom.
//   - leave-one-out or single holdout (wilson), same splits: McNemar's
//     test on the paired predictions (accuracy only), continuity-corrected,
//     exact binomial p-value when fewer than 25 predictions differ.
//   - leave-one-out or single holdout, different splits: the two-proportion
//     z-test (pooled variance) with Newcombe's hybrid score interval of
//     the difference (Newcombe 1998, method 10) (accuracy only).
//
// Splits count as the same for a cell when both runs hold predictions and
// the cell's test instances are identical (same rows in every repeat and
// fold); without predictions in both runs, when the manifests have the
// same seed and the same dataset records (checksum, rows, classes,
// features) and the cell's folds have the same sizes.
//
// A (cell, metric) entry regresses when the metric is gated (opt.Metrics,
// opt.Models), the drop exceeds opt.Tolerance (Delta < −Tolerance) and the
// test rejects "no change" at alpha after Holm's correction over every
// gated, tested entry. Errors (bad options, no cells in common, records
// inconsistent with their summary) are input errors.
func Compare(base, cur *results.Run, opt CompareOptions) (*results.RunComparison, error) {
	alpha := opt.Alpha
	if alpha == 0 {
		alpha = spec.DefaultTestAlpha
	}
	if !(alpha > 0 && alpha < 0.5) {
		return nil, &input.Error{Key: "alpha", Err: fmt.Errorf("alpha must lie in (0, 0.5), got %v", opt.Alpha)}
	}
	if !(opt.Tolerance >= 0) || math.IsInf(opt.Tolerance, 0) {
		return nil, &input.Error{Key: "tol", Err: fmt.Errorf("tolerance must be a finite number ≥ 0, got %v", opt.Tolerance)}
	}
	gated := opt.Metrics
	if len(gated) == 0 {
		gated = []string{results.MetricNames[0]}
	}
	for _, m := range gated {
		if !slices.Contains(results.MetricNames, m) {
			return nil, &input.Error{Key: "metric", Err: fmt.Errorf("unknown metric %q (want %s)", m, strings.Join(results.MetricNames, ", "))}
		}
	}
	rc := &results.RunComparison{
		BaseDir: base.Dir, NewDir: cur.Dir, Alpha: alpha, Tolerance: opt.Tolerance,
		Correction: "holm", Gated: gated,
	}
	if opt.NoCorrection {
		rc.Correction = "none"
	}
	bi := indexRun(base)
	ni := indexRun(cur)
	var matched []cellID
	for _, s := range base.Summary {
		id := idOf(s)
		if _, ok := ni.summary[id]; ok {
			matched = append(matched, id)
		} else {
			rc.OnlyBase = append(rc.OnlyBase, id.String())
		}
	}
	for _, s := range cur.Summary {
		if _, ok := bi.summary[idOf(s)]; !ok {
			rc.OnlyNew = append(rc.OnlyNew, idOf(s).String())
		}
	}
	if len(matched) == 0 {
		return nil, &input.Error{Err: fmt.Errorf("no cells in common between %s and %s (cells are matched by dataset, pipeline and model name)", base.Dir, cur.Dir)}
	}
	for _, m := range opt.Models {
		found := false
		for _, id := range matched {
			found = found || id.model == m
		}
		if !found {
			return nil, &input.Error{Key: "models", Err: fmt.Errorf("model %q is in no cell common to both runs", m)}
		}
	}
	manifestSame := sameManifests(base.Manifest, cur.Manifest)
	var nPaired, nUnpaired int
	var viaManifest bool
	var gatedIdx []int
	for _, id := range matched {
		bs, ns := base.Summary[bi.summary[id]], cur.Summary[ni.summary[id]]
		paired, how := pairedCell(bi, ni, id, manifestSame)
		if paired {
			nPaired++
			viaManifest = viaManifest || how == "manifest"
		} else {
			nUnpaired++
		}
		for mi, metric := range results.MetricNames {
			ch := results.CellChange{
				Dataset: id.dataset, Pipeline: id.pipeline, Model: id.model, Metric: metric,
				Base: bs.Metrics[mi].Mean, New: ns.Metrics[mi].Mean,
				Lo: math.NaN(), Hi: math.NaN(), P: math.NaN(), PAdj: math.NaN(), Statistic: math.NaN(),
				Method: "none",
			}
			ch.Delta = ch.New - ch.Base
			ch.Gated = slices.Contains(gated, metric) && (len(opt.Models) == 0 || slices.Contains(opt.Models, id.model))
			if err := testChange(&ch, bs, ns, bi, ni, id, mi, paired, alpha); err != nil {
				return nil, err
			}
			rc.Cells = append(rc.Cells, ch)
			if ch.Gated && !math.IsNaN(ch.P) {
				gatedIdx = append(gatedIdx, len(rc.Cells)-1)
			}
		}
	}
	switch {
	case nUnpaired == 0 && viaManifest:
		rc.Pairing = fmt.Sprintf("Splits: the same in all %d cells (judged from the manifests: same seed, same dataset records, same fold sizes); paired tests.", nPaired)
	case nUnpaired == 0:
		rc.Pairing = fmt.Sprintf("Splits: the same in all %d cells (identical test instances in every repeat and fold); paired tests.", nPaired)
	case nPaired == 0:
		rc.Pairing = fmt.Sprintf("Splits: different in all %d cells; unpaired tests.", nUnpaired)
	default:
		rc.Pairing = fmt.Sprintf("Splits: the same in %d cells (paired tests), different in %d (unpaired tests).", nPaired, nUnpaired)
	}
	if len(gatedIdx) > 0 {
		ps := make([]float64, len(gatedIdx))
		for i, j := range gatedIdx {
			ps[i] = rc.Cells[j].P
		}
		adj := ps
		if !opt.NoCorrection {
			var err error
			if adj, err = stats.HolmAdjust(ps); err != nil {
				return nil, fmt.Errorf("report: compare: %w", err)
			}
		}
		for i, j := range gatedIdx {
			c := &rc.Cells[j]
			c.PAdj = adj[i]
			c.Regression = c.Delta < -opt.Tolerance && c.PAdj <= alpha
			if c.Regression {
				rc.Regressions++
			}
		}
	}
	return rc, nil
}

func (c cellID) String() string { return c.dataset + "/" + c.pipeline + "/" + c.model }

// runIndex indexes the records of one run.
type runIndex struct {
	summary map[cellID]int
	folds   map[cellID]map[foldKey]results.Fold
	// inst[c] is the sorted list of the cell's test instances.
	inst map[cellID][]predKey
	// correct[c][(repeat, row)] is whether the prediction was right.
	correct map[cellID]map[instKey]bool
	hasPred bool
}

type predKey struct{ repeat, fold, row int }

func indexRun(r *results.Run) *runIndex {
	x := &runIndex{
		summary: map[cellID]int{}, folds: foldsByCell(r.Folds),
		inst: map[cellID][]predKey{}, correct: correctByCell(r.Predictions),
		hasPred: r.Predictions != nil,
	}
	for i, s := range r.Summary {
		x.summary[idOf(s)] = i
	}
	for _, p := range r.Predictions {
		id := cellID{p.Dataset, p.Pipeline, p.Model}
		x.inst[id] = append(x.inst[id], predKey{p.Repeat, p.Fold, p.Row})
	}
	for id := range x.inst {
		slices.SortFunc(x.inst[id], func(a, b predKey) int {
			return cmp.Or(cmp.Compare(a.repeat, b.repeat), cmp.Compare(a.fold, b.fold), cmp.Compare(a.row, b.row))
		})
	}
	return x
}

// sameManifests reports whether two runs drew their splits from the same
// seed and the same data.
func sameManifests(a, b *results.Manifest) bool {
	if a == nil || b == nil || a.Seed != b.Seed || len(a.Datasets) != len(b.Datasets) {
		return false
	}
	for i := range a.Datasets {
		x, y := a.Datasets[i], b.Datasets[i]
		if x.Name != y.Name || x.SHA256 != y.SHA256 || x.Rows != y.Rows ||
			!slices.Equal(x.Classes, y.Classes) || !slices.Equal(x.Counts, y.Counts) || !slices.Equal(x.Features, y.Features) {
			return false
		}
	}
	return true
}

// pairedCell decides whether a cell was scored on the same splits in both
// runs; how is "predictions" or "manifest".
func pairedCell(b, n *runIndex, id cellID, manifestSame bool) (bool, string) {
	if b.hasPred && n.hasPred {
		return len(b.inst[id]) > 0 && slices.Equal(b.inst[id], n.inst[id]), "predictions"
	}
	if !manifestSame || len(b.folds[id]) != len(n.folds[id]) {
		return false, "manifest"
	}
	for k, f := range b.folds[id] {
		g, ok := n.folds[id][k]
		if !ok || f.NTrain != g.NTrain || f.NTest != g.NTest {
			return false, "manifest"
		}
	}
	return true, "manifest"
}

// testChange fills the test of one (cell, metric) entry.
func testChange(ch *results.CellChange, bs, ns results.Summary, bi, ni *runIndex, id cellID, mi int, paired bool, alpha float64) error {
	if bs.Interval != ns.Interval {
		ch.Note = fmt.Sprintf("different protocols (%s vs %s): not tested", bs.Interval, ns.Interval)
		return nil
	}
	where := "compare " + id.String() + " " + ch.Metric
	switch bs.Interval {
	case "corrected-t":
		fb, fn := bi.folds[id], ni.folds[id]
		if len(fb) == 0 || len(fn) == 0 {
			return &input.Error{Err: fmt.Errorf("%s: the summary has the cell but folds.csv has no rows for it", id)}
		}
		if paired {
			var keys []foldKey
			for k := range fb {
				if _, ok := fn[k]; ok {
					keys = append(keys, k)
				}
			}
			slices.SortFunc(keys, func(p, q foldKey) int { return cmp.Or(cmp.Compare(p.repeat, q.repeat), cmp.Compare(p.fold, q.fold)) })
			xs, ys, d := make([]float64, len(keys)), make([]float64, len(keys)), make([]float64, len(keys))
			var ntr, nte float64
			for i, k := range keys {
				xs[i], ys[i] = fn[k].Scores.Values()[mi], fb[k].Scores.Values()[mi]
				d[i] = xs[i] - ys[i]
				ntr += float64(fb[k].NTrain)
				nte += float64(fb[k].NTest)
			}
			sizes := stats.Sizes{Train: ntr / float64(len(keys)), Test: nte / float64(len(keys))}
			r, err := stats.CorrectedPairedTSizes(xs, ys, sizes, alpha)
			if err != nil {
				return fmt.Errorf("report: %s: %w", where, err)
			}
			ch.Method, ch.Statistic, ch.DF, ch.P = "paired-t", r.Statistic, float64(r.DF), r.P
			if iv, err := stats.CorrectedIntervalSizes(d, sizes, alpha); err == nil && !math.IsNaN(iv.Lo) {
				ch.Delta, ch.Lo, ch.Hi = iv.Mean, iv.Lo, iv.Hi
			}
			ch.Note = strings.Join(r.Warnings, "; ")
			return nil
		}
		wb, err := cellInterval(fb, mi, alpha)
		if err != nil {
			return fmt.Errorf("report: %s: %w", where, err)
		}
		wn, err := cellInterval(fn, mi, alpha)
		if err != nil {
			return fmt.Errorf("report: %s: %w", where, err)
		}
		w := WelchT(wn.Mean, wn.SE, wn.DF, wb.Mean, wb.SE, wb.DF, alpha)
		ch.Method, ch.Statistic, ch.DF, ch.P = "welch-t", w.T, w.DF, w.P
		ch.Delta, ch.Lo, ch.Hi = w.Diff, w.Lo, w.Hi
		if math.IsNaN(w.P) {
			ch.Note = "standard errors undefined or zero: not tested"
		}
		return nil
	case "wilson":
		if mi != 0 {
			ch.Note = "pooled protocol: only accuracy is tested"
			return nil
		}
		if paired && bi.hasPred && ni.hasPred {
			cb, cn := bi.correct[id], ni.correct[id]
			var b, c, n int
			for k, rb := range cb {
				rn, ok := cn[k]
				if !ok {
					continue
				}
				n++
				switch {
				case rn && !rb:
					b++
				case !rn && rb:
					c++
				}
			}
			r, err := stats.McNemar(b, c, alpha)
			if err != nil {
				return fmt.Errorf("report: %s: %w", where, err)
			}
			ch.Method, ch.Statistic, ch.DF, ch.P = "mcnemar", r.Statistic, float64(r.DF), r.P
			if b+c < stats.McNemarSmall {
				ch.P = r.PExact
				ch.Note = fmt.Sprintf("b = %d, c = %d: exact binomial p-value", b, c)
			} else {
				ch.Note = fmt.Sprintf("b = %d, c = %d", b, c)
			}
			return nil
		}
		nb, nn := nTestTotal(bi.folds[id]), nTestTotal(ni.folds[id])
		if nb == 0 || nn == 0 {
			return &input.Error{Err: fmt.Errorf("%s: the summary has the cell but folds.csv has no rows for it", id)}
		}
		kb := int(math.Round(bs.Metrics[0].Mean * float64(nb)))
		kn := int(math.Round(ns.Metrics[0].Mean * float64(nn)))
		z := TwoProportions(kn, nn, kb, nb, alpha)
		ch.Method, ch.Statistic, ch.P = "two-proportion", z.Z, z.P
		ch.Delta, ch.Lo, ch.Hi = z.Diff, z.Lo, z.Hi
		return nil
	}
	ch.Note = fmt.Sprintf("unknown interval %q: not tested", bs.Interval)
	return nil
}

func nTestTotal(f map[foldKey]results.Fold) int {
	n := 0
	for _, x := range f {
		n += x.NTest
	}
	return n
}

// cellInterval is the corrected interval of one metric over a cell's
// folds, taken in (repeat, fold) order.
func cellInterval(f map[foldKey]results.Fold, mi int, alpha float64) (stats.Interval, error) {
	keys := make([]foldKey, 0, len(f))
	for k := range f {
		keys = append(keys, k)
	}
	slices.SortFunc(keys, func(p, q foldKey) int { return cmp.Or(cmp.Compare(p.repeat, q.repeat), cmp.Compare(p.fold, q.fold)) })
	v := make([]float64, len(keys))
	var ntr, nte float64
	for i, k := range keys {
		v[i] = f[k].Scores.Values()[mi]
		ntr += float64(f[k].NTrain)
		nte += float64(f[k].NTest)
	}
	n := float64(len(keys))
	return stats.CorrectedIntervalSizes(v, stats.Sizes{Train: ntr / n, Test: nte / n}, alpha)
}

// Welch is an unpaired comparison of two means from their standard
// errors.
type Welch struct {
	Diff, SE, T, DF, P, Lo, Hi float64
}

// WelchT compares two means with standard errors se1, se2 whose variance
// estimates have df1, df2 degrees of freedom: Diff = m1 − m2,
// SE² = se1² + se2², T = Diff/SE, the Welch–Satterthwaite degrees of
// freedom DF = SE⁴ / (se1⁴/df1 + se2⁴/df2), a two-sided p-value and the
// 1 − alpha interval Diff ∓ t(1 − alpha/2; DF)·SE. With the plain
// standard errors s/√n it is Welch's unequal-variance t-test; fringe
// passes the corrected standard errors of CorrectedInterval. A zero or
// undefined SE gives T, DF, P, Lo and Hi NaN.
func WelchT(m1, se1 float64, df1 int, m2, se2 float64, df2 int, alpha float64) Welch {
	w := Welch{Diff: m1 - m2}
	nan := math.NaN()
	v1, v2 := se1*se1, se2*se2
	w.SE = math.Sqrt(v1 + v2)
	if !(w.SE > 0) || df1 < 1 || df2 < 1 {
		w.T, w.DF, w.P, w.Lo, w.Hi = nan, nan, nan, nan, nan
		return w
	}
	w.DF = (v1 + v2) * (v1 + v2) / (v1*v1/float64(df1) + v2*v2/float64(df2))
	w.T = w.Diff / w.SE
	td := distuv.StudentsT{Mu: 0, Sigma: 1, Nu: w.DF}
	w.P = min(1, 2*td.Survival(math.Abs(w.T)))
	q := td.Quantile(1 - alpha/2)
	w.Lo, w.Hi = w.Diff-q*w.SE, w.Diff+q*w.SE
	return w
}

// Proportions is an unpaired comparison of two proportions.
type Proportions struct {
	Diff, Z, P, Lo, Hi float64
}

// TwoProportions compares k1/n1 with k2/n2: Diff = p1 − p2, the
// two-proportion z-test with the pooled proportion (z² is the Pearson
// chi-square of the 2×2 table without continuity correction), and
// Newcombe's hybrid score interval of the difference (Newcombe,
// Statistics in Medicine 17:873, 1998, method 10) from the two Wilson
// intervals at alpha:
//
//	Lo = Diff − sqrt((p1 − l1)² + (u2 − p2)²),  Hi = Diff + sqrt((u1 − p1)² + (p2 − l2)²).
//
// A pooled proportion of 0 or 1 gives Z = 0 and P = 1. It panics if a
// count is outside [0, n] or n < 1: callers derive counts from records.
func TwoProportions(k1, n1, k2, n2 int, alpha float64) Proportions {
	if n1 < 1 || n2 < 1 || k1 < 0 || k1 > n1 || k2 < 0 || k2 > n2 {
		panic(fmt.Sprintf("report: TwoProportions(%d, %d, %d, %d): counts out of range", k1, n1, k2, n2))
	}
	p1, p2 := float64(k1)/float64(n1), float64(k2)/float64(n2)
	r := Proportions{Diff: p1 - p2}
	pool := float64(k1+k2) / float64(n1+n2)
	se := math.Sqrt(pool * (1 - pool) * (1/float64(n1) + 1/float64(n2)))
	if se > 0 {
		r.Z = r.Diff / se
		r.P = min(1, 2*distuv.UnitNormal.Survival(math.Abs(r.Z)))
	} else {
		r.P = 1
	}
	l1, u1 := stats.Wilson(k1, n1, alpha)
	l2, u2 := stats.Wilson(k2, n2, alpha)
	r.Lo = r.Diff - math.Sqrt((p1-l1)*(p1-l1)+(u2-p2)*(u2-p2))
	r.Hi = r.Diff + math.Sqrt((u1-p1)*(u1-p1)+(p2-l2)*(p2-l2))
	return r
}
