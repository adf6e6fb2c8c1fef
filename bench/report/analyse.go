package report

import (
	"cmp"
	"fmt"
	"math"
	"slices"
	"strings"

	"fringe/bench/modelkit"
	"fringe/bench/spec"
	"fringe/bench/stats"
	"fringe/results"
)

// protocol describes the spec's protocol for captions.
func protocol(name string, seed uint64, cv spec.CV) results.Protocol {
	p := results.Protocol{
		Run: name, Seed: seed, CV: cv.Describe(), Level: 1 - Alpha,
		Test: cv.ResolvedTest().Describe(), Alpha: cv.TestAlpha(), Correction: "Holm", Pooled: cv.Pooled(),
	}
	if p.Pooled {
		p.Interval = "Wilson score interval of the accuracy of the pooled predictions; the other metrics have none"
	} else {
		p.Interval = "corrected resampled t interval, Nadeau & Bengio 2003"
	}
	return p
}

// Variant describes the model for the per-mode table and the sweep
// figures. It reads the validated parameters of an interference model:
// "mode" (exact, circuit, shots, noisy), "shots" (the budget; absent or 0
// for exact probabilities), "noise" (the noise table as written in the
// spec, channel name -> strength or [a, b] pair), "balance" and
// "train_subset". A noise table with one channel gives that channel's
// name and strength (the first value of a pair); several channels give
// their names joined by "+" and no strength (such a variant appears in
// the per-mode table but in no noise sweep). A string "noise" with a
// numeric "strength" is read too.
func VariantOf(m modelkit.Spec) results.Variant {
	v := results.Variant{Model: m.Name, Kind: m.Kind, Strength: math.NaN()}
	if m.Kind != "interference" && m.Kind != "counts" {
		v.Family = m.Name
		return v
	}
	v.Interference = true
	v.Mode, _ = m.Params["mode"].(string)
	if v.Mode == "" {
		v.Mode = "exact"
	}
	v.Shots = modelkit.ParamInt(m.Params["shots"])
	switch nz := m.Params["noise"].(type) {
	case string:
		v.Noise = nz
		v.Strength = modelkit.ParamFloat(m.Params["strength"])
	case map[string]any:
		var keys []string
		for k := range nz {
			keys = append(keys, k)
		}
		slices.Sort(keys)
		v.Noise = strings.Join(keys, "+")
		if len(keys) == 1 {
			x := nz[keys[0]]
			if arr, ok := x.([]any); ok && len(arr) > 0 {
				x = arr[0]
			}
			v.Strength = modelkit.ParamFloat(x)
		}
	}
	v.Family = "interference"
	if k := modelkit.ParamInt(m.Params["train_subset"]); k > 0 {
		v.Family += fmt.Sprintf("-k%d", k)
	}
	if b, _ := m.Params["balance"].(bool); b {
		v.Family += "-balanced"
	}
	return v
}

// Input is what Analyse needs: the records of a run, its protocol
// and the description of its models.
type Input struct {
	Name        string
	Seed        uint64
	CV          spec.CV
	Summary     []results.Summary
	Folds       []results.Fold
	Predictions []results.Prediction
	Variants    []results.Variant // one per model, in the run's model order
	Label       string            // LaTeX label of the summary table; "" for none
	// Warnings are the run's own warnings about its cells ({where,
	// what}), reported with those of the statistics.
	Warnings [][2]string
}

type analyser struct {
	in      Input
	test    spec.TestKind
	alpha   float64
	folds   map[cellID]map[foldKey]results.Fold
	correct map[cellID]map[instKey]bool
	cells   map[cellID]int // index into Summary
	variant map[string]results.Variant
	warn    [][2]string
}

// Analyse computes the marks of the summary table (best cell per dataset
// and metric; cells not significantly worse than it, by the protocol's
// paired test with Holm's correction within each dataset and metric), the
// paired comparisons with the reference model (the spec's reference on
// the same pipeline, or by default the classical cell with the highest
// mean accuracy on the dataset), the Friedman/Iman–Davenport test with the
// Nemenyi critical difference per pipeline across datasets, and Wilcoxon
// tests of each interference model against each baseline across
// datasets. Paired tests pair fold scores by (repeat, fold) and
// predictions by (repeat, row): every model of a dataset sees the same
// splits. Warnings of the statistics are gathered in Report.Warnings.
//
// It returns an error when the records do not fit the protocol (a 5x2cv
// test without 5 repeats of 2 folds, a summary cell without fold records)
// or a statistic rejects its input.
func Analyse(in Input) (*results.Report, error) {
	a := &analyser{
		in: in, test: in.CV.ResolvedTest(), alpha: in.CV.TestAlpha(),
		cells: map[cellID]int{}, variant: map[string]results.Variant{},
	}
	for _, v := range in.Variants {
		a.variant[v.Model] = v
	}
	for i, s := range in.Summary {
		a.cells[cellID{s.Dataset, s.Pipeline, s.Model}] = i
	}
	a.folds = foldsByCell(in.Folds)
	a.correct = correctByCell(in.Predictions)
	rep := &results.Report{
		Protocol: protocol(in.Name, in.Seed, in.CV),
		Label:    in.Label,
		Summary:  in.Summary,
		Variants: in.Variants,
	}
	var err error
	if rep.Marks, err = a.marks(); err != nil {
		return nil, err
	}
	if rep.Comparisons, rep.Reference, err = a.reference(); err != nil {
		return nil, err
	}
	if rep.Ranks, rep.Pairs, err = a.acrossDatasets(); err != nil {
		return nil, err
	}
	rep.Warnings = results.GroupWarnings(append(append([][2]string(nil), in.Warnings...), a.warn...))
	return rep, nil
}

func (a *analyser) datasets() []string {
	var out []string
	seen := map[string]bool{}
	for _, s := range a.in.Summary {
		if !seen[s.Dataset] {
			seen[s.Dataset] = true
			out = append(out, s.Dataset)
		}
	}
	return out
}

func (a *analyser) pipelines() []string {
	var out []string
	seen := map[string]bool{}
	for _, s := range a.in.Summary {
		if !seen[s.Pipeline] {
			seen[s.Pipeline] = true
			out = append(out, s.Pipeline)
		}
	}
	return out
}

// rowsOf returns the summary indices of a dataset, in summary order.
func (a *analyser) rowsOf(dataset string) []int {
	var out []int
	for i, s := range a.in.Summary {
		if s.Dataset == dataset {
			out = append(out, i)
		}
	}
	return out
}

// Tied reports whether two means are equal up to rounding (the tie rule
// of bench/stats).
func Tied(x, y float64) bool {
	return math.Abs(x-y) <= stats.TieTolerance*math.Max(math.Abs(x), math.Abs(y))
}

// compare runs the protocol's paired test of cell x against cell ref on
// metric mi. ok is false when no paired test applies (pooled protocols
// test accuracy only).
func (a *analyser) compare(x, ref results.Summary, mi int) (c results.Comparison, ok bool, err error) {
	c = results.Comparison{
		Dataset: x.Dataset, Pipeline: x.Pipeline, Model: x.Model,
		RefPipeline: ref.Pipeline, RefModel: ref.Model, Metric: results.MetricNames[mi],
		Test: a.test.String(), Diff: x.Metrics[mi].Mean - ref.Metrics[mi].Mean,
		Lo: math.NaN(), Hi: math.NaN(), Alpha: a.alpha,
	}
	where := fmt.Sprintf("%s/%s/%s vs %s/%s (%s)", x.Dataset, x.Pipeline, x.Model, ref.Pipeline, ref.Model, c.Metric)
	switch a.test {
	case spec.TestMcNemar:
		if ok, err := a.mcnemar(&c, x, ref, mi, where); !ok || err != nil {
			return c, false, err
		}
	case spec.TestCorrectedT, spec.Test5x2CV:
		if ok, err := a.foldTest(&c, x, ref, mi, where); !ok || err != nil {
			return c, false, err
		}
	default:
		return c, false, fmt.Errorf("report: unknown test %v", a.test)
	}
	for _, w := range c.Warnings {
		a.warn = append(a.warn, [2]string{where, w})
	}
	return c, true, nil
}

// mcnemar runs McNemar's test of cell x against ref on paired predictions
// (accuracy only: ok is false for other metrics) into c.
func (a *analyser) mcnemar(c *results.Comparison, x, ref results.Summary, mi int, where string) (ok bool, err error) {
	if mi != 0 {
		return false, nil
	}
	cx, cr := a.correct[idOf(x)], a.correct[idOf(ref)]
	if len(cx) == 0 || len(cr) == 0 {
		return false, fmt.Errorf("report: McNemar needs the predictions of %s", where)
	}
	keys := make([]instKey, 0, len(cx))
	for k := range cx {
		keys = append(keys, k)
	}
	slices.SortFunc(keys, func(p, q instKey) int { return cmp.Or(cmp.Compare(p.repeat, q.repeat), cmp.Compare(p.row, q.row)) })
	var b, cc, n int
	for _, k := range keys {
		rv, both := cr[k]
		if !both {
			continue
		}
		n++
		switch xv := cx[k]; {
		case xv && !rv:
			b++
		case !xv && rv:
			cc++
		}
	}
	if n != len(cx) || n != len(cr) {
		a.warn = append(a.warn, [2]string{where, fmt.Sprintf("only %d of %d/%d predictions pair up", n, len(cx), len(cr))})
	}
	r, err := stats.McNemar(b, cc, a.alpha)
	if err != nil {
		return false, fmt.Errorf("report: %s: %w", where, err)
	}
	c.Statistic, c.DF, c.P = r.Statistic, r.DF, r.P
	if b+cc < stats.McNemarSmall {
		c.P = r.PExact
	}
	if n > 0 {
		c.Diff = float64(b-cc) / float64(n)
	}
	c.Warnings = r.Warnings
	return true, nil
}

// foldTest runs the fold-based paired test (corrected resampled t, or
// 5x2cv) of cell x against ref on metric mi into c, pairing folds by
// (repeat, fold).
func (a *analyser) foldTest(c *results.Comparison, x, ref results.Summary, mi int, where string) (ok bool, err error) {
	fx, fr := a.folds[idOf(x)], a.folds[idOf(ref)]
	if len(fx) == 0 || len(fr) == 0 {
		return false, fmt.Errorf("report: no fold records for %s", where)
	}
	keys := make([]foldKey, 0, len(fx))
	for k := range fx {
		if _, ok := fr[k]; ok {
			keys = append(keys, k)
		}
	}
	slices.SortFunc(keys, func(p, q foldKey) int { return cmp.Or(cmp.Compare(p.repeat, q.repeat), cmp.Compare(p.fold, q.fold)) })
	if len(keys) != len(fx) || len(keys) != len(fr) {
		a.warn = append(a.warn, [2]string{where, fmt.Sprintf("only %d of %d/%d folds pair up", len(keys), len(fx), len(fr))})
	}
	if len(keys) == 0 {
		return false, fmt.Errorf("report: %s: no folds in common", where)
	}
	if a.test == spec.Test5x2CV {
		var diff [5][2]float64
		seen := 0
		var sum float64
		for _, k := range keys {
			if k.repeat < 0 || k.repeat >= 5 || k.fold < 0 || k.fold >= 2 {
				return false, fmt.Errorf("report: %s: 5x2cv needs repeats 0-4 and folds 0-1, found repeat %d fold %d", where, k.repeat, k.fold)
			}
			d := fx[k].Scores.Values()[mi] - fr[k].Scores.Values()[mi]
			diff[k.repeat][k.fold] = d
			sum += d
			seen++
		}
		if seen != 10 {
			return false, fmt.Errorf("report: %s: 5x2cv needs 10 paired folds, found %d", where, seen)
		}
		r, err := stats.FiveByTwoCV(diff, a.alpha)
		if err != nil {
			return false, fmt.Errorf("report: %s: %w", where, err)
		}
		c.Diff = sum / 10
		c.Statistic, c.DF, c.P, c.Warnings = r.Statistic, r.DF, r.P, r.Warnings
		return true, nil
	}
	xs, rs := make([]float64, len(keys)), make([]float64, len(keys))
	d := make([]float64, len(keys))
	var nTrain, nTest float64
	for i, k := range keys {
		xs[i] = fx[k].Scores.Values()[mi]
		rs[i] = fr[k].Scores.Values()[mi]
		d[i] = xs[i] - rs[i]
		nTrain += float64(fx[k].NTrain)
		nTest += float64(fx[k].NTest)
	}
	sizes := stats.Sizes{Train: nTrain / float64(len(keys)), Test: nTest / float64(len(keys))}
	r, err := stats.CorrectedPairedTSizes(xs, rs, sizes, a.alpha)
	if err != nil {
		return false, fmt.Errorf("report: %s: %w", where, err)
	}
	c.Statistic, c.DF, c.P, c.Warnings = r.Statistic, r.DF, r.P, r.Warnings
	if iv, err := stats.CorrectedIntervalSizes(d, sizes, a.alpha); err == nil {
		c.Diff, c.Lo, c.Hi = iv.Mean, iv.Lo, iv.Hi
	}
	return true, nil
}

// holm adjusts the p-values of a family in place and sets the decisions.
func holm(family []*results.Comparison, alpha float64) error {
	if len(family) == 0 {
		return nil
	}
	ps := make([]float64, len(family))
	for i, c := range family {
		ps[i] = c.P
		if math.IsNaN(ps[i]) {
			ps[i] = 1 // a test without a p-value (one pair) rejects nothing
		}
	}
	adj, err := stats.HolmAdjust(ps)
	if err != nil {
		return fmt.Errorf("report: %w", err)
	}
	for i, c := range family {
		c.PAdj = adj[i]
		c.Reject = adj[i] <= alpha
	}
	return nil
}

// marks returns the marks of the summary table.
func (a *analyser) marks() ([][]results.Mark, error) {
	rows := a.in.Summary
	marks := make([][]results.Mark, len(rows))
	for i := range rows {
		marks[i] = make([]results.Mark, len(rows[i].Metrics))
	}
	for _, ds := range a.datasets() {
		idx := a.rowsOf(ds)
		for mi := range results.MetricNames {
			best := -1
			for _, i := range idx {
				m := rows[i].Metrics[mi].Mean
				if !math.IsNaN(m) && (best < 0 || m > rows[best].Metrics[mi].Mean && !Tied(m, rows[best].Metrics[mi].Mean)) {
					best = i
				}
			}
			if best < 0 {
				continue
			}
			var family []*results.Comparison
			var famRows []int
			for _, i := range idx {
				m := rows[i].Metrics[mi].Mean
				if math.IsNaN(m) {
					continue
				}
				if Tied(m, rows[best].Metrics[mi].Mean) {
					marks[i][mi] = results.MarkBest
					continue
				}
				c, ok, err := a.compare(rows[i], rows[best], mi)
				if err != nil {
					return nil, err
				}
				if ok {
					family = append(family, &c)
					famRows = append(famRows, i)
				}
			}
			if err := holm(family, a.alpha); err != nil {
				return nil, err
			}
			for j, c := range family {
				if !(c.Reject && c.Diff < 0) {
					marks[famRows[j]][mi] = results.MarkNotWorse
				}
			}
		}
	}
	return marks, nil
}

// reference returns the comparisons with the reference model.
func (a *analyser) reference() ([]results.Comparison, string, error) {
	rows := a.in.Summary
	var out []results.Comparison
	var desc string
	named := a.in.CV.Reference
	if named != "" {
		desc = fmt.Sprintf("model %s on the same pipeline", named)
	} else {
		desc = "the classical baseline with the highest mean accuracy on each dataset (any pipeline)"
	}
	found := false
	for _, ds := range a.datasets() {
		idx := a.rowsOf(ds)
		// refOf[i] is the reference row of row i, -1 for none.
		refOf := map[int]int{}
		if named != "" {
			byPipe := map[string]int{}
			for _, i := range idx {
				if rows[i].Model == named {
					byPipe[rows[i].Pipeline] = i
				}
			}
			for _, i := range idx {
				if r, ok := byPipe[rows[i].Pipeline]; ok && r != i {
					refOf[i] = r
				}
			}
		} else {
			best := -1
			for _, i := range idx {
				// A model without a description is not known to be classical.
				if v, ok := a.variant[rows[i].Model]; !ok || v.Interference {
					continue
				}
				if best < 0 || rows[i].Metrics[0].Mean > rows[best].Metrics[0].Mean && !Tied(rows[i].Metrics[0].Mean, rows[best].Metrics[0].Mean) {
					best = i
				}
			}
			if best >= 0 {
				for _, i := range idx {
					if i != best {
						refOf[i] = best
					}
				}
			}
		}
		if len(refOf) > 0 {
			found = true
		}
		for mi := range results.MetricNames {
			var family []*results.Comparison
			start := len(out)
			for _, i := range idx {
				r, ok := refOf[i]
				if !ok {
					continue
				}
				c, ok, err := a.compare(rows[i], rows[r], mi)
				if err != nil {
					return nil, "", err
				}
				if ok {
					out = append(out, c)
				}
			}
			for j := start; j < len(out); j++ {
				family = append(family, &out[j])
			}
			if err := holm(family, a.alpha); err != nil {
				return nil, "", err
			}
		}
	}
	if !found {
		if named != "" {
			desc = fmt.Sprintf("model %s (not in the records: no comparisons)", named)
		} else {
			desc = "none (the run has no classical baseline)"
		}
	}
	// Order: dataset, metric, then summary order (as built).
	return out, desc, nil
}

// acrossDatasets returns the Friedman tables and the Wilcoxon pairs of
// each pipeline, on mean accuracy.
func (a *analyser) acrossDatasets() ([]results.RankTable, []results.PairAcross, error) {
	dss := a.datasets()
	if len(dss) < 2 {
		return nil, nil, nil
	}
	var tables []results.RankTable
	var pairs []results.PairAcross
	for _, pipe := range a.pipelines() {
		var models []string
		var scores [][]float64 // [dataset][model]
		for _, v := range a.in.Variants {
			complete := true
			for _, ds := range dss {
				if _, ok := a.cells[cellID{ds, pipe, v.Model}]; !ok {
					complete = false
					break
				}
			}
			if complete {
				models = append(models, v.Model)
			}
		}
		if len(models) < 2 {
			continue
		}
		score := func(ds, model string) float64 {
			return a.in.Summary[a.cells[cellID{ds, pipe, model}]].Metrics[0].Mean
		}
		for _, ds := range dss {
			row := make([]float64, len(models))
			for j, m := range models {
				row[j] = score(ds, m)
			}
			scores = append(scores, row)
		}
		fr, err := stats.Friedman(scores, a.alpha)
		if err != nil {
			return nil, nil, fmt.Errorf("report: pipeline %s: %w", pipe, err)
		}
		t := results.RankTable{
			Pipeline: pipe, Metric: results.MetricNames[0], Models: models, Datasets: dss,
			AvgRanks: fr.AvgRanks, ChiSq: fr.ChiSq, ChiSqP: fr.PChiSq, DF: fr.DF,
			ChiSqTieCorrected: fr.ChiSqTieCorrected, ChiSqTieCorrectedP: fr.PChiSqTieCorrected,
			F: fr.ImanDavenportF, DF1: fr.DF1, DF2: fr.DF2, P: fr.P, Alpha: fr.Alpha, Reject: fr.Reject,
			CD: fr.CD, Warnings: fr.Warnings,
		}
		names := make([]string, len(dss))
		for i, ds := range dss {
			names[i] = fmt.Sprintf("%d = %s", i, ds)
		}
		for _, w := range fr.Warnings {
			a.warn = append(a.warn, [2]string{fmt.Sprintf("Friedman, pipeline %s (data set indices: %s)", pipe, strings.Join(names, ", ")), w})
		}
		tables = append(tables, t)

		for _, qa := range models {
			if !a.variant[qa].Interference {
				continue
			}
			var fam []results.PairAcross
			for _, cb := range models {
				if a.variant[cb].Interference {
					continue
				}
				xa, xb := make([]float64, len(dss)), make([]float64, len(dss))
				for i, ds := range dss {
					xa[i], xb[i] = score(ds, qa), score(ds, cb)
				}
				w, err := stats.Wilcoxon(xa, xb, a.alpha)
				if err != nil {
					return nil, nil, fmt.Errorf("report: pipeline %s, %s vs %s: %w", pipe, qa, cb, err)
				}
				fam = append(fam, results.PairAcross{
					Pipeline: pipe, A: qa, B: cb, Metric: results.MetricNames[0], N: w.N,
					RPlus: w.RPlus, RMinus: w.RMinus, Statistic: w.Statistic, P: w.P, Alpha: a.alpha, Warnings: w.Warnings,
				})
				for _, wn := range w.Warnings {
					a.warn = append(a.warn, [2]string{fmt.Sprintf("Wilcoxon, pipeline %s, %s vs %s", pipe, qa, cb), wn})
				}
			}
			if len(fam) == 0 {
				continue
			}
			ps := make([]float64, len(fam))
			for i := range fam {
				ps[i] = fam[i].P
			}
			adj, err := stats.HolmAdjust(ps)
			if err != nil {
				return nil, nil, fmt.Errorf("report: %w", err)
			}
			for i := range fam {
				fam[i].PAdj = adj[i]
				fam[i].Reject = adj[i] <= a.alpha
			}
			pairs = append(pairs, fam...)
		}
	}
	return tables, pairs, nil
}

// Alpha is the level of the confidence intervals in summaries (95%).
const Alpha = 0.05
