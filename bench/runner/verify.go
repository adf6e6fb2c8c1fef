package runner

import (
	"bytes"
	"encoding/csv"
	"errors"
	"fmt"
	"io/fs"
	"math"
	"os"
	"path/filepath"
	"sort"
	"strconv"
	"strings"

	"fringe/bench/input"
	"fringe/bench/plan"
	"fringe/bench/spec"
	"fringe/qkernel"
	"fringe/results"
)

// Problem is one finding of Verify: the file at fault (relative to the run
// directory) and what is wrong with it.
type Problem struct {
	File string
	Msg  string
}

func (p Problem) String() string { return p.File + ": " + p.Msg }

// VerifyOptions configure Verify.
type VerifyOptions struct {
	// SpecDir is the folder the spec's relative data paths are resolved
	// against; "" uses the manifest's spec_dir (the folder the run was made
	// from). Set it when a published run directory is checked on another
	// machine that holds the spec's CSV files elsewhere.
	SpecDir string
}

// Verified is the outcome of Verify.
type Verified struct {
	Digests    int      // files checked against the digest list
	Recomputed []string // files recomputed from predictions.csv and the spec, and compared
	Problems   []Problem
}

// recomputed are the files Verify recomputes from predictions.csv and the
// spec and compares with the run directory's.
var recomputed = []string{"predictions.csv", "folds.csv", "summary.csv", "comparisons.csv", "tuning.csv"}

// roundedColumns are the columns computed from values predictions.csv
// holds rounded to results.FloatDigits decimals (the post-selection
// probability): recomputed from the rounded values, a mean moves by at most
// half a unit of the last decimal, and writing both with the same decimals
// may then differ by one more unit. They are compared within 1.5 units.
var roundedColumns = map[string]bool{"mean_p_acc": true}

// Verify checks a run directory as fringe wrote it, so that a reader of a
// paper can check a published run: the manifest's own digest
// (results.CheckManifestSeal), the digest list (results.DigestsFile)
// against the manifest, every file against the digest list (and no file
// beside it), timings.csv against the manifest; and it rebuilds the plan
// from the spec the manifest records (datasets reloaded and checked
// against the manifest's records), turns predictions.csv back into task
// results and recomputes predictions.csv, folds.csv, summary.csv and
// comparisons.csv (and tuning.csv, read back into the grid searches it
// records), which must agree with the directory's (byte for byte, but for
// the columns in roundedColumns). learning.csv is checked by its digest
// only: predictions.csv holds the run's own tasks, not the learning
// curve's. Every finding is a Problem
// naming its file. The error is for a directory that cannot be checked at
// all (no such directory, no readable manifest); it is an input error.
func Verify(dir string, opt VerifyOptions) (*Verified, error) {
	st, err := os.Stat(dir)
	if err != nil || !st.IsDir() {
		return nil, &input.Error{File: dir, Err: errors.New("not a run directory (no such directory)")}
	}
	v := &Verified{}
	add := func(file, format string, args ...any) {
		v.Problems = append(v.Problems, Problem{File: file, Msg: fmt.Sprintf(format, args...)})
	}
	mdata, err := os.ReadFile(filepath.Join(dir, "manifest.json"))
	if err != nil {
		return nil, &input.Error{File: dir, Err: fmt.Errorf("not a run directory: %w", err)}
	}
	m, err := results.ReadManifest(bytes.NewReader(mdata), filepath.Join(dir, "manifest.json"))
	if err != nil {
		return nil, &input.Error{Err: err}
	}
	if !results.CheckManifestSeal(mdata) {
		add("manifest.json", "its content does not match its manifest_sha256 (edited after fringe wrote it, or written by a fringe without seals)")
	}
	v.checkDigests(dir, m, add)
	v.recompute(dir, m, opt, add)
	return v, nil
}

// checkDigests checks the digest list and every file against it.
func (v *Verified) checkDigests(dir string, m *results.Manifest, add func(file, format string, args ...any)) {
	sealed := map[string]bool{"manifest.json": true, "timings.csv": true, results.DigestsFile: true}
	if data, err := os.ReadFile(filepath.Join(dir, "timings.csv")); err != nil {
		add("timings.csv", "missing (%v)", err)
	} else if results.SHA256Hex(data) != m.TimingsSHA {
		add("timings.csv", "its content does not match timings_sha256 in manifest.json")
	}
	list, err := os.ReadFile(filepath.Join(dir, results.DigestsFile))
	if err != nil {
		add(results.DigestsFile, "missing (%v)", err)
		return
	}
	if results.SHA256Hex(list) != m.DigestsSHA {
		add(results.DigestsFile, "its content does not match digests_sha256 in manifest.json")
	}
	want, order, err := results.ParseDigestList(list, results.DigestsFile)
	if err != nil {
		add(results.DigestsFile, "%v", err)
		return
	}
	for _, name := range order {
		if sealed[name] || !filepath.IsLocal(filepath.FromSlash(name)) {
			add(results.DigestsFile, "lists %s, which it must not", name)
			continue
		}
		data, err := os.ReadFile(filepath.Join(dir, filepath.FromSlash(name)))
		if err != nil {
			add(name, "listed in %s but missing", results.DigestsFile)
			continue
		}
		v.Digests++
		if results.SHA256Hex(data) != want[name] {
			add(name, "its content does not match its digest in %s", results.DigestsFile)
		}
	}
	var extra []string
	filepath.WalkDir(dir, func(path string, d fs.DirEntry, err error) error {
		if err != nil || d.IsDir() {
			return nil
		}
		rel, _ := filepath.Rel(dir, path)
		rel = filepath.ToSlash(rel)
		if _, ok := want[rel]; !ok && !sealed[rel] {
			extra = append(extra, rel)
		}
		return nil
	})
	sort.Strings(extra)
	for _, name := range extra {
		add(name, "not listed in %s (added after fringe wrote the run)", results.DigestsFile)
	}
}

// recompute rebuilds the run's task results from predictions.csv and the
// spec and compares the recomputed files with the directory's.
func (v *Verified) recompute(dir string, m *results.Manifest, opt VerifyOptions, add func(file, format string, args ...any)) {
	if results.SHA256Hex([]byte(m.SpecText)) != m.SpecSHA {
		add("manifest.json", "spec_text does not match spec_sha256")
	}
	sp, err := spec.Parse(m.SpecFile, []byte(m.SpecText))
	if err != nil {
		add("manifest.json", "the recorded spec does not parse: %v", err)
		return
	}
	sp.Dir = m.SpecDir
	if opt.SpecDir != "" {
		sp.Dir = opt.SpecDir
	}
	p, err := plan.New(sp)
	if err != nil {
		add("manifest.json", "the run's plan cannot be rebuilt from its spec (data files resolved against %q; -spec-dir names another folder): %v", sp.Dir, err)
		return
	}
	if !sameDatasets(p, m, add) {
		return
	}
	if !sameDevices(p, m, add) {
		return
	}
	f, err := os.Open(filepath.Join(dir, "predictions.csv"))
	if err != nil {
		add("predictions.csv", "missing: nothing to recompute from")
		return
	}
	preds, err := results.ReadPredictions(f, "predictions.csv")
	f.Close()
	if err != nil {
		add("predictions.csv", "%v", err)
		return
	}
	res, err := resultsFromPredictions(p, preds)
	if err != nil {
		add("predictions.csv", "%v", err)
		return
	}
	if p.Spec.Tuned() {
		// The grid searches cannot be recomputed from predictions.csv:
		// they are read from tuning.csv, which folds.csv must agree with.
		f, err := os.Open(filepath.Join(dir, "tuning.csv"))
		if err != nil {
			add("tuning.csv", "missing: the run has tuned models")
			return
		}
		rows, err := results.ReadTuning(f, "tuning.csv")
		f.Close()
		if err != nil {
			add("tuning.csv", "%v", err)
			return
		}
		if err := applyTuning(p, res, rows); err != nil {
			add("tuning.csv", "%v", err)
			return
		}
	}
	c, err := renderRun(p, res, true, 1)
	if err != nil {
		add("predictions.csv", "the records do not give a report: %v", err)
		return
	}
	for _, r := range c.files {
		if !contains(recomputed, r.Name) {
			continue
		}
		v.Recomputed = append(v.Recomputed, r.Name)
		have, err := os.ReadFile(filepath.Join(dir, r.Name))
		if err != nil {
			add(r.Name, "missing")
			continue
		}
		if msg := compareCSV(have, r.Data); msg != "" {
			add(r.Name, "differs from what predictions.csv and the spec give: %s", msg)
		}
	}
}

func contains(s []string, x string) bool {
	for _, y := range s {
		if y == x {
			return true
		}
	}
	return false
}

// sameDatasets checks the rebuilt plan's datasets against the manifest's
// records (name, source checksum, rows, classes, counts, features).
func sameDatasets(p *plan.Plan, m *results.Manifest, add func(file, format string, args ...any)) bool {
	if len(p.Datasets) != len(m.Datasets) {
		add("manifest.json", "records %d datasets, the spec gives %d", len(m.Datasets), len(p.Datasets))
		return false
	}
	ok := true
	for i, d := range p.Datasets {
		r := m.Datasets[i]
		var diff []string
		if r.Name != d.Name {
			diff = append(diff, fmt.Sprintf("name %q, not %q", r.Name, d.Name))
		}
		if r.SHA256 != d.Data.Source.SHA256 {
			diff = append(diff, "its source file's sha256")
		}
		if r.Rows != d.Data.Len() || fmt.Sprint(r.Classes) != fmt.Sprint(d.Data.Classes) ||
			fmt.Sprint(r.Counts) != fmt.Sprint(d.Data.ClassCounts()) || fmt.Sprint(r.Features) != fmt.Sprint(d.Data.Features) {
			diff = append(diff, "its rows, classes or features")
		}
		if len(diff) > 0 {
			add("manifest.json", "dataset %s differs from the data now loaded for the spec: %s", d.Name, strings.Join(diff, ", "))
			ok = false
		}
	}
	return ok
}

// sameDevices checks the rebuilt plan's devices and calibration files
// against the manifest's records (their SHA-256): a device description or
// calibration file edited since the run is reported.
func sameDevices(p *plan.Plan, m *results.Manifest, add func(file, format string, args ...any)) bool {
	now := DeviceRecords(p)
	if len(now) != len(m.Devices) {
		add("manifest.json", "records %d model(s) with a device or calibration, the spec gives %d", len(m.Devices), len(now))
		return false
	}
	ok := true
	for i, r := range now {
		was := m.Devices[i]
		switch {
		case was.Model != r.Model || was.Device != r.Device:
			add("manifest.json", "model %s on device %q, the spec gives model %s on device %q", was.Model, was.Device, r.Model, r.Device)
			ok = false
		case was.SHA256 != r.SHA256:
			add("manifest.json", "model %s: the description of device %s (%s) differs from the one the run used (sha256)", r.Model, r.Device, orEmbedded(r.File))
			ok = false
		case was.CalibrationSHA256 != r.CalibrationSHA256:
			add("manifest.json", "model %s: calibration file %s differs from the one the run used (sha256)", r.Model, r.Calibration)
			ok = false
		}
	}
	return ok
}

func orEmbedded(file string) string {
	if file == "" {
		return "embedded"
	}
	return file
}

// applyTuning gives the tuned models' task results their grid searches
// as tuning.csv records them.
func applyTuning(p *plan.Plan, res []TaskResult, rows []results.TuningRow) error {
	byKey := map[string][]results.TuningRow{}
	for _, r := range rows {
		key := fmt.Sprintf("%s/%s/%s/%d/%d", r.Dataset, r.Pipeline, r.Model, r.Repeat, r.Fold)
		byKey[key] = append(byKey[key], r)
	}
	for i := range res {
		t := res[i].Task
		g := p.Spec.Models[t.Model].Grid
		if g == nil {
			continue
		}
		rs := byKey[p.Key(t)]
		if len(rs) != len(g.Points) {
			return fmt.Errorf("task %s has %d grid points, its model %d", p.Key(t), len(rs), len(g.Points))
		}
		tu := &Tuning{Scores: make([]float64, len(rs)), Chosen: -1}
		for k, r := range rs {
			if r.Point != k || r.Params != g.Label(k) {
				return fmt.Errorf("task %s: point %d is %q, the grid's is %q", p.Key(t), r.Point, r.Params, g.Label(k))
			}
			tu.Scores[k] = r.Score
			if r.Chosen {
				tu.Chosen = k
			}
		}
		if tu.Chosen < 0 {
			return fmt.Errorf("task %s: no grid point is marked chosen", p.Key(t))
		}
		res[i].Tuning = tu
	}
	return nil
}

// resultsFromPredictions turns the rows of predictions.csv back into the
// task results of plan p, in task order: predictions and, for models that
// reported them, details (post-selection probability, shots, class
// probabilities, unused mass and the exact-mode decision, as written);
// scores are recomputed. Rows must come task by task, in each task's test
// order, as fringe writes them.
func resultsFromPredictions(p *plan.Plan, preds []results.Prediction) ([]TaskResult, error) {
	index := map[string]int{}
	for i, t := range p.Tasks {
		index[p.Key(t)] = i
	}
	byTask := make([][]results.Prediction, len(p.Tasks))
	for k, r := range preds {
		key := fmt.Sprintf("%s/%s/%s/%d/%d", r.Dataset, r.Pipeline, r.Model, r.Repeat, r.Fold)
		i, ok := index[key]
		if !ok {
			return nil, fmt.Errorf("row %d: task %s is not a task of the spec", k+2, key)
		}
		byTask[i] = append(byTask[i], r)
	}
	var out []TaskResult
	for i, t := range p.Tasks {
		if t.Size > 0 {
			continue // the learning curve's tasks are in learning.csv only
		}
		rows := byTask[i]
		d := p.Datasets[t.Dataset]
		sp := d.Splits[t.Split]
		if len(rows) != len(sp.Test) {
			return nil, fmt.Errorf("task %s has %d rows, its split has %d test instances", p.Key(t), len(rows), len(sp.Test))
		}
		class := map[string]int{}
		for k, c := range d.Data.Classes {
			class[c] = k
		}
		r := TaskResult{Task: t, NTrain: len(sp.Train), NTest: len(sp.Test), Pred: make([]int, len(rows))}
		detailed := false
		for _, row := range rows {
			detailed = detailed || !math.IsNaN(row.PAcc) || row.Probs != nil
		}
		if detailed {
			r.Details = make([]qkernel.Detail, len(rows))
		}
		truth := make([]int, len(rows))
		for k, row := range rows {
			j := sp.Test[k]
			if row.Row != d.Data.Rows[j] {
				return nil, fmt.Errorf("task %s: row %d where the split has row %d", p.Key(t), row.Row, d.Data.Rows[j])
			}
			if row.Label != d.Data.Classes[d.Data.Y[j]] {
				return nil, fmt.Errorf("task %s, row %d: label %q, the dataset has %q", p.Key(t), row.Row, row.Label, d.Data.Classes[d.Data.Y[j]])
			}
			pk, ok := class[row.Predicted]
			if !ok {
				return nil, fmt.Errorf("task %s, row %d: predicted class %q is not a class of the dataset", p.Key(t), row.Row, row.Predicted)
			}
			r.Pred[k], truth[k] = pk, d.Data.Y[j]
			if detailed {
				det := qkernel.Detail{PAcc: row.PAcc, Shots: row.Shots, Probs: row.Probs, Unused: row.Unused, Exact: pk}
				if row.Exact != "" {
					ek, ok := class[row.Exact]
					if !ok {
						return nil, fmt.Errorf("task %s, row %d: exact-mode class %q is not a class of the dataset", p.Key(t), row.Row, row.Exact)
					}
					det.Exact = ek
				}
				if row.RawPredicted != "" {
					rk, ok := class[row.RawPredicted]
					if !ok {
						return nil, fmt.Errorf("task %s, row %d: unmitigated class %q is not a class of the dataset", p.Key(t), row.Row, row.RawPredicted)
					}
					// Unused before mitigation is not in predictions.csv
					// (nor in any recomputed file).
					det.Raw = &qkernel.RawDetail{Pred: rk, PAcc: row.RawPAcc, Probs: row.RawProbs, Unused: math.NaN()}
				}
				if k > 0 && (det.Raw != nil) != (r.Details[0].Raw != nil) {
					return nil, fmt.Errorf("task %s, row %d: unmitigated decisions for some test instances only", p.Key(t), row.Row)
				}
				r.Details[k] = det
			}
		}
		r.Scores = results.Score(truth, r.Pred, len(d.Data.Classes))
		out = append(out, r)
	}
	return out, nil
}

// compareCSV compares two CSV texts cell by cell: equal, or, in a column
// of roundedColumns, numbers within 1.5 units of the last written decimal.
// It returns "" when they agree, else where they first differ.
func compareCSV(have, want []byte) string {
	if bytes.Equal(have, want) {
		return ""
	}
	h, err := csv.NewReader(bytes.NewReader(have)).ReadAll()
	if err != nil {
		return fmt.Sprintf("not CSV (%v)", err)
	}
	w, err := csv.NewReader(bytes.NewReader(want)).ReadAll()
	if err != nil {
		return fmt.Sprintf("recomputed text is not CSV (%v)", err)
	}
	if len(h) != len(w) {
		return fmt.Sprintf("%d lines, recomputed %d", len(h), len(w))
	}
	tol := 1.5 * math.Pow(10, -results.FloatDigits)
	tolerated := false
	for i := range h {
		if len(h[i]) != len(w[i]) {
			return fmt.Sprintf("line %d has %d fields, recomputed %d", i+1, len(h[i]), len(w[i]))
		}
		for j := range h[i] {
			if h[i][j] == w[i][j] {
				continue
			}
			col := ""
			if j < len(w[0]) {
				col = w[0][j]
			}
			if i > 0 && roundedColumns[col] {
				a, err1 := strconv.ParseFloat(h[i][j], 64)
				b, err2 := strconv.ParseFloat(w[i][j], 64)
				if err1 == nil && err2 == nil && math.Abs(a-b) <= tol {
					tolerated = true
					continue
				}
			}
			return fmt.Sprintf("line %d, column %s: %q, recomputed %q", i+1, col, h[i][j], w[i][j])
		}
	}
	if tolerated {
		return "" // every difference is the rounding of roundedColumns
	}
	return "the bytes differ (line endings or quoting)"
}
