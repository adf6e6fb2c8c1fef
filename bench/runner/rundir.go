package runner

import (
	"bytes"
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"runtime"
	"runtime/debug"
	"time"

	"fringe/bench/outdir"
	"fringe/bench/plan"
	"fringe/bench/report"
	"fringe/bench/spec"
	"fringe/bench/stats"
	"fringe/results"
)

// Version is fringe's version string, recorded in manifests.
const Version = "0.1.0-dev"

// Records turns task results into the rows of predictions.csv, folds.csv and
// timings.csv, in task order.
func Records(p *plan.Plan, res []TaskResult) ([]results.Prediction, []results.Fold, []results.Timing) {
	res = runOnly(res)
	nPred := 0
	for _, r := range res {
		nPred += len(p.Datasets[r.Task.Dataset].Splits[r.Task.Split].Test)
	}
	preds := make([]results.Prediction, 0, nPred)
	folds := make([]results.Fold, 0, len(res))
	times := make([]results.Timing, 0, len(res))
	for _, r := range res {
		t := r.Task
		d := p.Datasets[t.Dataset]
		sp := d.Splits[t.Split]
		pipe := p.Spec.Pipelines[t.Pipeline]
		model := p.Spec.Models[t.Model].Name
		mode, _ := p.Spec.Models[t.Model].Params["mode"].(string)
		notExact := mode != "" && mode != "exact"
		for i, j := range sp.Test {
			pr := results.Prediction{
				Dataset: d.Name, Pipeline: pipe, Model: model,
				Repeat: sp.Repeat, Fold: sp.Fold, Row: d.Data.Rows[j],
				Label:     d.Data.Classes[d.Data.Y[j]],
				Predicted: d.Data.Classes[r.Pred[i]],
				PAcc:      math.NaN(), Unused: math.NaN(), RawPAcc: math.NaN(),
			}
			if r.Details != nil {
				det := r.Details[i]
				pr.PAcc, pr.Shots, pr.Probs, pr.Unused = det.PAcc, det.Shots, det.Probs, det.Unused
				if notExact {
					pr.Exact = d.Data.Classes[det.Exact]
				}
				if raw := det.Raw; raw != nil {
					pr.RawPredicted, pr.RawPAcc, pr.RawProbs = d.Data.Classes[raw.Pred], raw.PAcc, raw.Probs
				}
			}
			preds = append(preds, pr)
		}
		fold := results.Fold{
			Dataset: d.Name, Pipeline: pipe, Model: model,
			Repeat: sp.Repeat, Fold: sp.Fold, NTrain: r.NTrain, NTest: r.NTest,
			Scores: r.Scores, MeanPAcc: meanPAcc(r.Details),
			MeanShots: math.NaN(), ExactDisagreement: math.NaN(),
		}
		if g := p.Spec.Models[t.Model].Grid; g != nil && r.Tuning != nil {
			fold.Chosen = g.Label(r.Tuning.Chosen)
		}
		if len(r.Details) > 0 {
			var shots, differ float64
			for i, det := range r.Details {
				shots += float64(det.Shots)
				if det.Exact != r.Pred[i] {
					differ++
				}
			}
			if shots > 0 {
				fold.MeanShots = shots / float64(len(r.Details))
			}
			if notExact {
				fold.ExactDisagreement = differ / float64(len(r.Details))
			}
			if r.Details[0].Raw != nil {
				fold.Mitigated = true
				for i, det := range r.Details {
					if det.Raw != nil && det.Raw.Pred != r.Pred[i] {
						fold.MitigationChanged++
					}
				}
			}
		}
		folds = append(folds, fold)
		times = append(times, results.Timing{
			Dataset: d.Name, Pipeline: pipe, Model: model,
			Repeat: sp.Repeat, Fold: sp.Fold, Seconds: r.Elapsed.Seconds(),
		})
	}
	return preds, folds, times
}

// Summarise computes one summary row per (dataset, pipeline, model) cell, in
// task order. For k-fold and repeated holdout protocols the interval is the
// corrected resampled t interval (Nadeau & Bengio 2003, variance factor
// 1/(r k) + n_test/n_train, with the mean sizes over the folds, not
// rounded: uneven folds enter through their mean, so for k-fold
// cross-validation n_test/n_train is exactly 1/(k-1)); for leave-one-out and a single holdout, where
// that interval degenerates, the metrics are computed on the pooled
// predictions and accuracy gets a Wilson score interval (the other metrics
// get none). Interval bounds are clipped to [0, 1], the range of every metric.
func Summarise(p *plan.Plan, res []TaskResult) []results.Summary {
	return summarise(p, runOnly(res))
}

// summarise is Summarise of the given results, whatever their Size.
func summarise(p *plan.Plan, res []TaskResult) []results.Summary {
	type cellKey struct{ d, p, m int }
	var order []cellKey
	cells := map[cellKey][]TaskResult{}
	for _, r := range res {
		k := cellKey{r.Task.Dataset, r.Task.Pipeline, r.Task.Model}
		if _, ok := cells[k]; !ok {
			order = append(order, k)
		}
		cells[k] = append(cells[k], r)
	}
	pooled := p.Spec.CV.Method == spec.CVLeaveOneOut || (p.Spec.CV.Method == spec.CVHoldout && p.Spec.CV.Repeats == 1)
	var out []results.Summary
	for _, k := range order {
		rs := cells[k]
		d := p.Datasets[k.d]
		s := results.Summary{
			Dataset: d.Name, Pipeline: p.Spec.Pipelines[k.p], Model: p.Spec.Models[k.m].Name,
			Folds: len(rs), MeanPAcc: math.NaN(),
		}
		var pacc []float64
		for _, r := range rs {
			for _, x := range r.Details {
				pacc = append(pacc, x.PAcc)
			}
		}
		if len(pacc) > 0 {
			s.MeanPAcc = mean(pacc)
		}
		if pooled {
			var truth, pred []int
			for _, r := range rs {
				sp := d.Splits[r.Task.Split]
				for i, j := range sp.Test {
					truth = append(truth, d.Data.Y[j])
					pred = append(pred, r.Pred[i])
				}
			}
			sc := results.Score(truth, pred, len(d.Data.Classes))
			s.Interval = "wilson"
			correct := int(math.Round(sc.Accuracy * float64(len(truth))))
			lo, hi := stats.Wilson(correct, len(truth), report.Alpha)
			nan := math.NaN()
			s.Metrics = []results.MetricSummary{
				{Mean: sc.Accuracy, Std: nan, Lo: lo, Hi: hi},
				{Mean: sc.BalancedAccuracy, Std: nan, Lo: nan, Hi: nan},
				{Mean: sc.MacroF1, Std: nan, Lo: nan, Hi: nan},
			}
		} else {
			s.Interval = "corrected-t"
			var nTrain, nTest float64
			for _, r := range rs {
				nTrain += float64(r.NTrain)
				nTest += float64(r.NTest)
			}
			nTrain /= float64(len(rs))
			nTest /= float64(len(rs))
			for mi := range results.MetricNames {
				v := make([]float64, len(rs))
				for i, r := range rs {
					v[i] = r.Scores.Values()[mi]
				}
				iv, err := stats.CorrectedIntervalSizes(v, stats.Sizes{Train: nTrain, Test: nTest}, report.Alpha)
				if err != nil {
					// Only impossible inputs (no scores, non-finite metrics) get here.
					panic(fmt.Sprintf("runner: summary interval: %v", err))
				}
				// Every metric lies in [0, 1]; the t interval does not know that.
				s.Metrics = append(s.Metrics, results.MetricSummary{Mean: iv.Mean, Std: iv.Std, Lo: clip01(iv.Lo), Hi: clip01(iv.Hi)})
			}
		}
		out = append(out, s)
	}
	return out
}

// clip01 clips an interval bound to [0, 1], keeping NaN.
func clip01(v float64) float64 {
	if v < 0 {
		return 0
	}
	if v > 1 {
		return 1
	}
	return v
}

func mean(v []float64) float64 {
	s := 0.0
	for _, x := range v {
		s += x
	}
	return s / float64(len(v))
}

// RunInfo carries what the manifest records beyond the plan.
type RunInfo struct {
	Command []string
	Workers int
	Start   time.Time
	End     time.Time
	// NoFigures leaves the figures out of the run directory (the tables
	// and CSV files are unchanged).
	NoFigures bool
}

// Manifest builds the run's manifest. Its warnings are the spec's own
// (p.Spec.Warnings: old spellings, located) followed by warnings.
func Manifest(p *plan.Plan, info RunInfo, warnings []string) *results.Manifest {
	m := &results.Manifest{
		Tool: "fringe", Version: Version, GoVersion: runtime.Version(),
		Modules:  map[string]string{},
		Command:  info.Command,
		SpecName: p.Spec.Name, SpecFile: p.Spec.File, SpecDir: absDir(p.Spec.Dir), SpecText: string(p.Spec.Source),
		Seed: p.Spec.Seed, Workers: info.Workers, Tasks: len(p.Tasks),
		Start:   info.Start.UTC().Format(time.RFC3339Nano),
		End:     info.End.UTC().Format(time.RFC3339Nano),
		Seconds: info.End.Sub(info.Start).Seconds(),
		GOOS:    runtime.GOOS, GOARCH: runtime.GOARCH, CPUs: runtime.NumCPU(),
		Warnings: append(append([]string(nil), p.Spec.Warnings...), warnings...),
	}
	if m.Warnings == nil {
		m.Warnings = []string{}
	}
	sum := sha256.Sum256(p.Spec.Source)
	m.SpecSHA = hex.EncodeToString(sum[:])
	m.Host, _ = os.Hostname()
	if bi, ok := debug.ReadBuildInfo(); ok {
		for _, dep := range bi.Deps {
			m.Modules[dep.Path] = dep.Version
		}
	}
	m.Devices = DeviceRecords(p)
	for _, d := range p.Datasets {
		src := d.Data.Source
		m.Datasets = append(m.Datasets, results.DatasetRecord{
			Name: d.Name, Source: d.Spec.Name, Title: src.Title, Origin: src.Origin, Citation: src.Citation,
			Licence: src.Licence, File: src.File, SHA256: src.SHA256, Synthetic: src.Synthetic, Note: src.Note,
			Rows: d.Data.Len(), Features: d.Data.Features, Classes: d.Data.Classes, Counts: d.Data.ClassCounts(),
		})
	}
	return m
}

// DeviceRecords lists the devices and calibration files of the plan's
// models (modelkit.Spec.Hardware), in model order, for the manifest;
// nil when no model names one. Files inside the spec's folder are
// recorded relative to it.
func DeviceRecords(p *plan.Plan) []results.DeviceRecord {
	var out []results.DeviceRecord
	for _, m := range p.Spec.Models {
		hw, ok := m.Hardware()
		if !ok {
			continue
		}
		r := results.DeviceRecord{Model: m.Name, Device: hw.Device, File: relPath(p.Spec.Dir, hw.DeviceFile), SHA256: hw.DeviceSHA,
			Calibration: relPath(p.Spec.Dir, hw.Calibration), CalibrationSHA256: hw.CalibrationSHA}
		if hw.Mitigate {
			r.Mitigate = "readout"
		}
		out = append(out, r)
	}
	return out
}

// relPath is path relative to dir when it lies inside it ("" stays "").
func relPath(dir, path string) string {
	if path == "" || dir == "" {
		return path
	}
	if rel, err := filepath.Rel(dir, path); err == nil && filepath.IsLocal(rel) {
		return filepath.ToSlash(rel)
	}
	return path
}

// Write writes a complete run directory at dir: the records (CSV), the
// report (summary.tex with its standalone wrapper, summary.md,
// comparisons.csv; see report.Analyse), the figures (figures/*.svg, .pdf,
// .png; see report.Figures and report.KernelFigure), the digest list
// (results.DigestsFile) and the manifest, whose warnings gain the grouped
// warnings of the statistics and of the LaTeX tables, and which seals the
// digest list, timings.csv and itself (results.SealManifest). Files are
// first written into a temporary directory beside dir, which is renamed
// into place only when every file is complete; an existing dir is
// replaced only then. On error nothing is left behind.
func Write(p *plan.Plan, dir string, res []TaskResult, info RunInfo, warnings []string) error {
	c, err := renderRun(p, res, info.NoFigures, info.Workers)
	if err != nil {
		return err
	}
	var timings bytes.Buffer
	if err := results.WriteTimings(&timings, c.times); err != nil {
		return err
	}
	content := map[string][]byte{}
	for _, f := range c.files {
		content[f.Name] = f.Data
	}
	digests := results.DigestList(content)
	m := Manifest(p, info, append(append([]string(nil), warnings...), c.warnings...))
	m.DigestsSHA, m.TimingsSHA = results.SHA256Hex(digests), results.SHA256Hex(timings.Bytes())
	manifest, err := results.SealManifest(m)
	if err != nil {
		return err
	}
	files := append(c.files,
		outdir.Rendered{Name: results.DigestsFile, Data: digests},
		outdir.Rendered{Name: "timings.csv", Data: timings.Bytes()},
		outdir.Rendered{Name: "manifest.json", Data: manifest})
	return outdir.WriteRendered(dir, files)
}

// TuningRecords are the rows of tuning.csv: every grid point of every
// tuned model's task, in task order and grid order.
func TuningRecords(p *plan.Plan, res []TaskResult) []results.TuningRow {
	res = runOnly(res)
	var out []results.TuningRow
	for _, r := range res {
		t := r.Task
		g := p.Spec.Models[t.Model].Grid
		if g == nil || r.Tuning == nil {
			continue
		}
		d := p.Datasets[t.Dataset]
		sp := d.Splits[t.Split]
		for i, s := range r.Tuning.Scores {
			out = append(out, results.TuningRow{
				Dataset: d.Name, Pipeline: p.Spec.Pipelines[t.Pipeline], Model: p.Spec.Models[t.Model].Name,
				Repeat: sp.Repeat, Fold: sp.Fold, Point: i, Params: g.Label(i),
				Metric: p.Spec.Tune.MetricName(), Score: s, Chosen: i == r.Tuning.Chosen,
			})
		}
	}
	return out
}

// choices counts, per tuned model and (dataset, pipeline), how often each
// grid point was chosen, in run order, grid order within a cell.
func choices(p *plan.Plan, res []TaskResult) []results.ChoiceCount {
	res = runOnly(res)
	type cell struct{ d, p, m int }
	var order []cell
	counts := map[cell][]int{}
	for _, r := range res {
		t := r.Task
		g := p.Spec.Models[t.Model].Grid
		if g == nil || r.Tuning == nil {
			continue
		}
		k := cell{t.Dataset, t.Pipeline, t.Model}
		if counts[k] == nil {
			counts[k] = make([]int, len(g.Points))
			order = append(order, k)
		}
		counts[k][r.Tuning.Chosen]++
	}
	var out []results.ChoiceCount
	for _, k := range order {
		g := p.Spec.Models[k.m].Grid
		of := 0
		for _, n := range counts[k] {
			of += n
		}
		for i, n := range counts[k] {
			if n > 0 {
				out = append(out, results.ChoiceCount{Dataset: p.Datasets[k.d].Name, Pipeline: p.Spec.Pipelines[k.p],
					Model: p.Spec.Models[k.m].Name, Params: g.Label(i), Count: n, Of: of})
			}
		}
	}
	return out
}

// renderedRun is what a run directory holds but its manifest, timings and
// digest list: the files that are byte-identical for the same spec and
// seed, rendered, with the timing records and the warnings of the
// statistics and the tables.
type renderedRun struct {
	files    []outdir.Rendered
	times    []results.Timing
	warnings []string
}

// renderRun renders the deterministic files of a run directory, at most
// workers files at a time. With two workers or more, predictions.csv and
// folds.csv (the largest files, which need only the records) are rendered
// beside the analysis of the run, the others once the report is made; the
// bytes do not depend on workers.
func renderRun(p *plan.Plan, res []TaskResult, noFigures bool, workers int) (*renderedRun, error) {
	preds, folds, times := Records(p, res)
	records := []outdir.File{
		{Name: "predictions.csv", Render: func(b *bytes.Buffer) error { return results.WritePredictions(b, preds) }},
		{Name: "folds.csv", Render: func(b *bytes.Buffer) error { return results.WriteFolds(b, folds) }},
	}
	early := renderBeside(records, workers > 1)
	in := reportInput(p, res, preds, folds)
	summary := in.Summary
	rep, err := report.Analyse(in)
	if err != nil {
		return nil, err
	}
	rep.Options = p.Spec.ReportOptions()
	rep.Choices = choices(p, res)
	var figs []results.Figure
	if !noFigures {
		figs, err = report.Figures(rep, preds)
		if err != nil {
			return nil, err
		}
		kf, err := report.KernelFigure(p)
		if err != nil {
			return nil, err
		}
		figs = append(figs, kf)
	}
	for _, f := range figs {
		rep.Figures = append(rep.Figures, results.FigureRef{Path: f.Name, Caption: f.Caption})
	}
	tex, err := results.ReportTeX(rep)
	if err != nil {
		return nil, err
	}
	files := []outdir.File{
		{Name: "summary.csv", Render: func(b *bytes.Buffer) error { return results.WriteSummary(b, summary) }},
		{Name: "summary.tex", Render: func(b *bytes.Buffer) error { b.WriteString(tex.Text); return nil }},
		{Name: results.StandaloneName, Render: func(b *bytes.Buffer) error {
			b.WriteString(results.StandaloneTeX(rep, "summary.tex"))
			return nil
		}},
		{Name: "summary.md", Render: func(b *bytes.Buffer) error { return results.WriteReportMarkdown(b, rep) }},
		{Name: "comparisons.csv", Render: func(b *bytes.Buffer) error { return results.WriteComparisons(b, rep.Comparisons) }},
	}
	if learning := LearningRecords(p, res); learning != nil {
		files = append(files, outdir.File{Name: "learning.csv", Render: func(b *bytes.Buffer) error { return results.WriteLearning(b, learning) }})
		if !noFigures {
			lf, err := results.LearningFigures(learning, 1-report.Alpha, outdir.SafeName)
			if err != nil {
				return nil, err
			}
			for _, f := range lf {
				rep.Figures = append(rep.Figures, results.FigureRef{Path: f.Name, Caption: f.Caption})
			}
			files = append(files, outdir.FigureFiles(lf)...)
		}
	}
	if p.Spec.Tuned() {
		tuning := TuningRecords(p, res)
		files = append(files, outdir.File{Name: "tuning.csv", Render: func(b *bytes.Buffer) error { return results.WriteTuning(b, tuning) }})
	}
	files = append(files, outdir.FigureFiles(figs)...)
	rest, err := outdir.RenderLimit(files, workers)
	if err != nil {
		return nil, err
	}
	first, err := early()
	if err != nil {
		return nil, err
	}
	out := append(first, rest...)
	warns := append(append([]string(nil), rep.Warnings...), tex.Warnings...)
	return &renderedRun{files: out, times: times, warnings: warns}, nil
}

// renderBeside renders files in a goroutine of its own when beside is
// set (else at once, in the caller's); the returned function waits for
// them and returns them in order, or the first error.
func renderBeside(files []outdir.File, beside bool) func() ([]outdir.Rendered, error) {
	if !beside {
		out, err := outdir.RenderLimit(files, 1)
		return func() ([]outdir.Rendered, error) { return out, err }
	}
	var out []outdir.Rendered
	var err error
	done := make(chan struct{})
	go func() {
		defer close(done)
		out, err = outdir.RenderLimit(files, 1)
	}()
	return func() ([]outdir.Rendered, error) {
		<-done
		return out, err
	}
}

// Report analyses a finished run: report.Analyse on its records, with
// the spec's report options (spec.Spec.ReportOptions).
func Report(p *plan.Plan, res []TaskResult) (*results.Report, error) {
	preds, folds, _ := Records(p, res)
	rep, err := report.Analyse(reportInput(p, res, preds, folds))
	if err != nil {
		return nil, err
	}
	rep.Options = p.Spec.ReportOptions()
	return rep, nil
}

func reportInput(p *plan.Plan, res []TaskResult, preds []results.Prediction, folds []results.Fold) report.Input {
	in := report.Input{
		Name: p.Spec.Name, Seed: p.Spec.Seed, CV: p.Spec.CV,
		Summary: Summarise(p, res), Folds: folds, Predictions: preds,
		Label: "tab:" + p.Spec.Name,
	}
	for _, m := range p.Spec.Models {
		in.Variants = append(in.Variants, report.VariantOf(m))
	}
	in.Warnings = degenerate(p, res)
	return in
}

// degenerate warns about cells whose model predicts a single class on
// every test instance of every fold, and says so louder when its decision
// values were also equal on every fold (TaskResult.ConstantDecision): the
// model then does not look at the data at all, and its scores are those of
// a constant, whatever exit status the run has.
func degenerate(p *plan.Plan, res []TaskResult) [][2]string {
	res = runOnly(res)
	type cell struct{ d, p, m int }
	type state struct {
		class            int
		single, constant bool
		decided          int // tasks with more than one test instance
	}
	var order []cell
	cells := map[cell]*state{}
	for _, r := range res {
		k := cell{r.Task.Dataset, r.Task.Pipeline, r.Task.Model}
		st, ok := cells[k]
		if !ok {
			if len(r.Pred) == 0 {
				continue
			}
			st = &state{class: r.Pred[0], single: true, constant: true}
			cells[k] = st
			order = append(order, k)
		}
		for _, c := range r.Pred {
			st.single = st.single && c == st.class
		}
		if len(r.Pred) > 1 {
			st.decided++
			st.constant = st.constant && r.ConstantDecision
		}
	}
	var out [][2]string
	for _, k := range order {
		st := cells[k]
		if !st.single {
			continue
		}
		d := p.Datasets[k.d]
		where := fmt.Sprintf("%s/%s/%s", d.Name, p.Spec.Pipelines[k.p], p.Spec.Models[k.m].Name)
		msg := fmt.Sprintf("predicts class %s on every test instance of every fold", d.Data.Classes[st.class])
		if st.constant && st.decided > 0 {
			msg += ", with the same decision values for every instance: the model does not discriminate (check its parameters)"
		}
		out = append(out, [2]string{where, msg})
	}
	return out
}

// absDir is dir made absolute ("" stays "": a built-in spec).
func absDir(dir string) string {
	if dir == "" {
		return ""
	}
	if abs, err := filepath.Abs(dir); err == nil {
		return abs
	}
	return dir
}

// runOnly keeps the results of the run itself, without the learning
// curve's tasks (plan.Task.Size > 0), which only learning.csv and its
// figures show.
func runOnly(res []TaskResult) []TaskResult {
	for i, r := range res {
		if r.Task.Size > 0 {
			out := append([]TaskResult(nil), res[:i]...)
			for _, r := range res[i+1:] {
				if r.Task.Size == 0 {
					out = append(out, r)
				}
			}
			return out
		}
	}
	return res
}
