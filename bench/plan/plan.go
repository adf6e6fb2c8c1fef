package plan

import (
	"errors"
	"fmt"
	"math"
	"path/filepath"
	"strconv"

	"fringe/baselines"
	"fringe/bench/cv"
	"fringe/bench/input"
	"fringe/bench/modelkit"
	"fringe/bench/spec"
	"fringe/datasets"
	"fringe/qkernel"
	"fringe/qkernel/circuit"
	"fringe/qkernel/sim"
)

// Plan is a spec made concrete: datasets loaded, splits drawn, tasks listed.
// Building a plan checks all input that can be checked before any model is
// fitted, so bad input fails fast and leaves nothing behind.
type Plan struct {
	Spec     *spec.Spec
	Datasets []*Dataset
	Tasks    []Task

	layout *modelkit.Layout // what models may know of the run (TaskContext.Layout)
}

// Dataset is a loaded dataset with its splits (all repeats).
type Dataset struct {
	Spec   spec.Dataset
	Name   string // display name
	Data   *datasets.Dataset
	Splits []cv.Split // in (repeat, fold) order

	subsamples [][][]int // [split][size]: the learning curve's training rows
}

// Task is one unit of work: fit one pipeline and one model on one split of
// one dataset. Its key is stable across runs and worker counts.
type Task struct {
	Index    int // position in task order
	Dataset  int // index into Plan.Datasets
	Pipeline int // index into Spec.Pipelines
	Model    int // index into Spec.Models
	Split    int // index into Dataset.Splits
	// Size is 0 for a task of the run itself; k >= 1 for a task of the
	// learning curve, fitted on the nested class-stratified subsample of
	// the training part of size Spec.CV.TrainSizes[k-1] (TrainRows).
	Size int
}

// Key returns the task's stable key: dataset/pipeline/model/repeat/fold.
func (p *Plan) Key(t Task) string {
	d := p.Datasets[t.Dataset]
	s := d.Splits[t.Split]
	key := fmt.Sprintf("%s/%s/%s/%d/%d", d.Name, p.Spec.Pipelines[t.Pipeline], p.Spec.Models[t.Model].Name, s.Repeat, s.Fold)
	if t.Size > 0 {
		key += "@" + strconv.FormatFloat(p.Spec.CV.TrainSizes[t.Size-1], 'g', -1, 64)
	}
	return key
}

// New loads the spec's datasets, draws the splits and lists the tasks in
// order (dataset, pipeline, model, repeat, fold). All errors are input
// errors (errors.Is(err, input.ErrBad)).
func New(s *spec.Spec) (*Plan, error) {
	// The tables' options name models, pipelines and datasets: a spec
	// built in code has not been through spec.Parse's check.
	if err := s.CheckReport(); err != nil {
		return nil, err
	}
	p := &Plan{Spec: s}
	for _, ds := range s.Datasets {
		pd, err := planDataset(s, ds)
		if err != nil {
			return nil, err
		}
		p.Datasets = append(p.Datasets, pd)
	}
	if err := p.drawSubsamples(); err != nil {
		return nil, err
	}
	if err := p.resolveModels(); err != nil {
		return nil, err
	}
	if err := p.checkModels(); err != nil {
		return nil, err
	}
	for di, d := range p.Datasets {
		for pi := range s.Pipelines {
			for mi := range s.Models {
				for si := range d.Splits {
					p.Tasks = append(p.Tasks, Task{Index: len(p.Tasks), Dataset: di, Pipeline: pi, Model: mi, Split: si})
				}
			}
		}
	}
	// The learning curve's tasks come after the run's, so that a spec
	// with train_sizes keeps the run's task order and keys.
	for k := range s.CV.TrainSizes {
		for di, d := range p.Datasets {
			for pi := range s.Pipelines {
				for mi := range s.Models {
					for si := range d.Splits {
						p.Tasks = append(p.Tasks, Task{Index: len(p.Tasks), Dataset: di, Pipeline: pi, Model: mi, Split: si, Size: k + 1})
					}
				}
			}
		}
	}
	p.layout = p.newLayout()
	return p, nil
}

// drawSubsamples draws the learning curve's nested subsamples of every
// training part: one Subsampler per (dataset, split), seeded from the run
// seed, the dataset and the split, so that every pipeline and model sees
// the same subsamples and a smaller size's rows are among a larger one's.
func (p *Plan) drawSubsamples() error {
	sizes := p.Spec.CV.TrainSizes
	if len(sizes) == 0 {
		return nil
	}
	for _, d := range p.Datasets {
		d.subsamples = make([][][]int, len(d.Splits))
		for si, sp := range d.Splits {
			rng := NewRand(p.Spec.Seed, "learning", d.Name, strconv.Itoa(sp.Repeat), strconv.Itoa(sp.Fold))
			sub, err := cv.NewSubsampler(sp.Train, d.Data.Y, len(d.Data.Classes), rng)
			if err != nil {
				return &input.Error{File: p.Spec.File, Key: "cv.train_sizes", Err: fmt.Errorf("dataset %s: %w", d.Name, err)}
			}
			for _, f := range sizes {
				rows, err := sub.Take(cv.Size{Fraction: f})
				if err != nil {
					return &input.Error{File: p.Spec.File, Line: p.Spec.LineOf("cv.train_sizes"), Key: "cv.train_sizes",
						Err: fmt.Errorf("dataset %s, repeat %d fold %d: size %g: %w", d.Name, sp.Repeat, sp.Fold, f, err)}
				}
				d.subsamples[si] = append(d.subsamples[si], rows)
			}
		}
	}
	return nil
}

// TrainRows returns the training part task t is fitted on (indices into
// its dataset): the split's, or for a learning-curve task its subsample.
func (p *Plan) TrainRows(t Task) []int {
	d := p.Datasets[t.Dataset]
	if t.Size == 0 {
		return d.Splits[t.Split].Train
	}
	return d.subsamples[t.Split][t.Size-1]
}

// TrainSize is the fraction of the training part task t is fitted on (1
// for a task of the run itself).
func (p *Plan) TrainSize(t Task) float64 {
	if t.Size == 0 {
		return 1
	}
	return p.Spec.CV.TrainSizes[t.Size-1]
}

func planDataset(s *spec.Spec, ds spec.Dataset) (*Dataset, error) {
	inErr := func(err error) error {
		return &input.Error{File: s.File, Line: ds.Line, Err: fmt.Errorf("dataset %s: %w", ds.Display(), err)}
	}
	data, err := LoadDataset(s, ds)
	if err != nil {
		return nil, err
	}
	counts := data.ClassCounts()
	present := 0
	for _, c := range counts {
		if c > 0 {
			present++
		}
	}
	if present < 2 {
		return nil, inErr(fmt.Errorf("needs at least two classes with members, has %d", present))
	}
	pd := &Dataset{Spec: ds, Name: ds.Display(), Data: data}
	switch s.CV.Method {
	case spec.CVLeaveOneOut:
		pd.Splits = cv.LeaveOneOut(data.Len())
	case spec.CVStratified:
		for r := 0; r < s.CV.Repeats; r++ {
			rng := NewRand(s.Seed, "split", pd.Name, fmt.Sprint(r))
			sp, err := cv.Stratified(data.Y, len(data.Classes), s.CV.Folds, rng)
			if err != nil {
				return nil, inErr(classError(err, data, s.CV.Folds))
			}
			for i := range sp {
				sp[i].Repeat = r
			}
			pd.Splits = append(pd.Splits, sp...)
		}
	case spec.CVHoldout:
		for r := 0; r < s.CV.Repeats; r++ {
			rng := NewRand(s.Seed, "split", pd.Name, fmt.Sprint(r))
			sp, err := cv.Holdout(data.Y, len(data.Classes), s.CV.TestFraction, rng)
			if err != nil {
				return nil, inErr(classError(err, data, 0))
			}
			sp.Repeat, sp.Fold = r, 0
			pd.Splits = append(pd.Splits, sp)
		}
	}
	// Every training part must hold at least two classes.
	for _, sp := range pd.Splits {
		seen := map[int]bool{}
		for _, i := range sp.Train {
			seen[data.Y[i]] = true
		}
		if len(seen) < 2 {
			return nil, inErr(fmt.Errorf("repeat %d fold %d: training part holds a single class", sp.Repeat, sp.Fold))
		}
	}
	return pd, nil
}

// LoadDataset loads a dataset named in a spec (embedded, synthetic, or a
// CSV, ARFF or svmlight file, relative paths resolved against the spec's
// directory) and applies its class and feature selection.
func LoadDataset(s *spec.Spec, ds spec.Dataset) (*datasets.Dataset, error) {
	inErr := func(err error) error {
		return &input.Error{File: s.File, Line: ds.Line, Err: fmt.Errorf("dataset %s: %w", ds.Display(), err)}
	}
	var data *datasets.Dataset
	var err error
	if ds.IsFile() {
		path := ds.Name
		if !filepath.IsAbs(path) && s.Dir != "" {
			path = filepath.Join(s.Dir, path)
		}
		format, err := datasets.ParseFormat(ds.Format)
		if err != nil {
			return nil, inErr(err)
		}
		base, err := datasets.ParseIndexBase(ds.IndexBase)
		if err != nil {
			return nil, inErr(err)
		}
		data, err = datasets.LoadFile(path, datasets.LoadOptions{Format: format, Label: ds.Label, DropInvalid: ds.DropInvalid, IndexBase: base})
		if err != nil {
			var le *datasets.CSVError
			if errors.As(err, &le) {
				return nil, &input.Error{Err: err} // the loader's error names file, line and column
			}
			return nil, inErr(err)
		}
	} else {
		if ds.Label != "" || ds.DropInvalid {
			return nil, inErr(fmt.Errorf("label and drop_invalid apply to data files only"))
		}
		data, err = datasets.Load(ds.Name)
		if err != nil {
			return nil, inErr(err)
		}
	}
	if len(ds.Classes) > 0 || len(ds.Features) > 0 {
		data, err = data.Subset(ds.Classes, ds.Features)
		if err != nil {
			return nil, inErr(err)
		}
	}
	return data, nil
}

// classError adds the class name to a splitter error.
func classError(err error, data *datasets.Dataset, folds int) error {
	var ce *cv.ClassError
	if errors.As(err, &ce) && ce.Class >= 0 && ce.Class < len(data.Classes) {
		if folds > 0 {
			return fmt.Errorf("class %q has %d members, fewer than the %d folds", data.Classes[ce.Class], ce.Count, folds)
		}
		return fmt.Errorf("class %q has %d members, fewer than the %d a stratified holdout needs", data.Classes[ce.Class], ce.Count, ce.Need)
	}
	return err
}

// checkModels rejects parameters that cannot fit the planned splits: k of
// k-NN larger than a training part, and an interference model's
// train_subset larger than a training part or smaller than the number of
// classes it holds.
func (p *Plan) checkModels() error {
	if err := p.checkPipelines(); err != nil {
		return err
	}
	if err := p.checkQubits(); err != nil {
		return err
	}
	if err := p.checkHardware(); err != nil {
		return err
	}
	if err := p.checkKernels(); err != nil {
		return err
	}
	if err := p.checkInnerFolds(); err != nil {
		return err
	}
	for mi, mm := range p.Spec.Models {
		for _, m := range mm.Configs() {
			if err := p.checkSizes(mi, mm, m); err != nil {
				return err
			}
		}
	}
	return nil
}

// checkSizes checks k of k-NN and train_subset of one configuration m of
// model mi against the training parts it is fitted on: the outer ones, or
// for a tuned model the smallest inner ones.
func (p *Plan) checkSizes(mi int, mm, m modelkit.Spec) error {
	var key string
	var k int
	switch m.Kind {
	case "knn":
		key, k = "k", m.Params["k"].(int)
	case "interference", "counts":
		key, k = "train_subset", modelkit.ParamInt(m.Params["train_subset"])
	default:
		return nil
	}
	if k == 0 {
		return nil
	}
	full := fmt.Sprintf("model[%d].%s", mi+1, key)
	bad := func(err error) error {
		return &input.Error{File: p.Spec.File, Line: p.Spec.LineOf(full), Key: full, Err: err}
	}
	for _, d := range p.Datasets {
		for si, sp := range d.Splits {
			train := sp.Train
			if len(d.subsamples) > 0 {
				train = d.subsamples[si][0] // the learning curve's smallest
			}
			n, what := len(train), "training instances"
			if len(d.subsamples) > 0 {
				what = "training instances of the smallest learning-curve subsample"
			}
			if mm.Grid != nil {
				n, what = p.innerTrainSize(d, train), "instances of the smallest inner training part"
			}
			if k > n {
				return bad(fmt.Errorf("%s = %d exceeds the %d %s of dataset %s (repeat %d fold %d): %w",
					key, k, n, what, d.Name, sp.Repeat, sp.Fold, baselines.ErrParam))
			}
			if m.Kind == "knn" {
				continue
			}
			seen := map[int]bool{}
			for _, i := range train {
				seen[d.Data.Y[i]] = true
			}
			if k < len(seen) {
				return bad(fmt.Errorf("train_subset = %d is smaller than the %d classes in the training instances of dataset %s (repeat %d fold %d); a class-balanced subset needs one per class",
					k, len(seen), d.Name, sp.Repeat, sp.Fold))
			}
		}
	}
	return nil
}

// innerTrainSize is a lower bound of the training part of every inner
// fold of a stratified k-fold split (Tune.Folds) of the rows train: each
// class of n_c rows gives at most ceil(n_c/k) of them to one inner test
// part.
func (p *Plan) innerTrainSize(d *Dataset, train []int) int {
	count := make([]int, len(d.Data.Classes))
	for _, i := range train {
		count[d.Data.Y[i]]++
	}
	k := p.Spec.Tune.Folds
	if k < 2 {
		k = 5
	}
	test := 0
	for _, c := range count {
		test += (c + k - 1) / k
	}
	return len(train) - test
}

// checkInnerFolds refuses an inner fold count above the smallest class of
// an outer training part, for the tuned models' stratified inner
// cross-validation.
func (p *Plan) checkInnerFolds() error {
	if !p.Spec.Tuned() {
		return nil
	}
	k := p.Spec.Tune.Folds
	for _, d := range p.Datasets {
		for si, sp := range d.Splits {
			train := sp.Train
			if len(d.subsamples) > 0 {
				train = d.subsamples[si][0] // the learning curve's smallest
			}
			count := make([]int, len(d.Data.Classes))
			for _, i := range train {
				count[d.Data.Y[i]]++
			}
			for c, n := range count {
				if n > 0 && n < k {
					part := "the training part"
					if len(d.subsamples) > 0 {
						part = "the smallest learning-curve subsample of the training part"
					}
					return &input.Error{File: p.Spec.File, Line: p.Spec.LineOf("tune.folds"), Key: "tune.folds",
						Err: fmt.Errorf("%d inner folds, but class %q has %d members in %s of dataset %s, repeat %d fold %d: lower tune.folds (default 5)",
							k, d.Data.Classes[c], n, part, d.Name, sp.Repeat, sp.Fold)}
				}
			}
		}
	}
	return nil
}

// checkPipelines rejects a pipeline whose steps cannot be fitted on the
// smallest training part of a dataset (pca(k) with k above its rows or
// features, select(k) with k above the features), before anything runs.
func (p *Plan) checkPipelines() error {
	for _, ps := range p.Spec.Pipelines {
		pipe, err := datasets.ParsePipeline(ps)
		if err != nil {
			return &input.Error{File: p.Spec.File, Line: p.Spec.LineOf("pipelines"), Key: "pipelines", Err: err}
		}
		for _, d := range p.Datasets {
			minTrain := math.MaxInt
			for _, sp := range d.Splits {
				minTrain = min(minTrain, len(sp.Train))
			}
			if _, err := pipe.CheckDims(minTrain, d.Data.Dim()); err != nil {
				return &input.Error{File: p.Spec.File, Line: p.Spec.LineOf("pipelines"), Key: "pipelines",
					Err: fmt.Errorf("dataset %s (smallest training part %d rows, %d features): %w", d.Name, minTrain, d.Data.Dim(), err)}
			}
		}
	}
	return nil
}

// checkKernels rejects an SVM whose kernel is not finite, or collapses to
// one value, on a dataset after a pipeline (baselines.SVM.CheckData; the
// pipeline fitted on every row, as an illustration of what the folds
// see): a kernel that overflows gives a model that predicts one class on
// every fold without any error.
func (p *Plan) checkKernels() error {
	for mi, mm := range p.Spec.Models {
		for _, m := range mm.Configs() {
			if m.Kind != "svm" {
				continue
			}
			for _, ps := range p.Spec.Pipelines {
				pipe, err := datasets.ParsePipeline(ps)
				if err != nil {
					return &input.Error{File: p.Spec.File, Line: p.Spec.LineOf("pipelines"), Key: "pipelines", Err: err}
				}
				for _, d := range p.Datasets {
					Z, err := pipe.FitTransformLabeled(d.Data.X, d.Data.Y, d.Data.Rows)
					if err != nil {
						continue // reported, located, when the split is prepared
					}
					svm, ok := m.New(0).(*baselines.SVM)
					if !ok {
						continue
					}
					if err := svm.CheckData(Z); err != nil {
						key := fmt.Sprintf("model[%d]", mi+1)
						var pe *baselines.ParamError
						if errors.As(err, &pe) {
							key += "." + mm.WrittenKey(pe.Param)
						}
						return &input.Error{File: p.Spec.File, Line: p.Spec.LineOf(key), Key: key,
							Err: fmt.Errorf("model %s on dataset %s, pipeline %s: %w", m.Name, d.Name, ps, err)}
					}
				}
			}
		}
	}
	return nil
}

// checkQubits rejects an interference model whose circuit, for the largest
// training part (or its train_subset) and the features after each pipeline,
// needs more qubits than the simulator it will run on holds: the density
// matrix (sim.MaxDensityQubits) when chosen explicitly, state vectors and
// trajectories (sim.MaxStateQubits) otherwise. Checking here makes the error
// immediate and the same on every run.
func (p *Plan) checkQubits() error {
	for mi, mm := range p.Spec.Models {
		for _, m := range mm.Configs() {
			q := m.Interference
			if q == nil || q.Mode == qkernel.ModeExact || q.Mode == qkernel.ModeShots {
				continue
			}
			gate := q.Mode == qkernel.ModeCircuit || !q.Noise.IsZero() || q.Method != sim.Auto || onDevice(m)
			if !gate {
				continue // closed-form channels only
			}
			limit, simName, alt := sim.MaxStateQubits, "state-vector and trajectory simulators hold", "set train_subset"
			if q.Method == sim.DensityMatrix {
				limit, simName, alt = sim.MaxDensityQubits, "density-matrix simulator holds", "set train_subset or method = \"trajectories\""
			}
			for _, d := range p.Datasets {
				for _, ps := range p.Spec.Pipelines {
					pipe, err := datasets.ParsePipeline(ps)
					if err != nil {
						return &input.Error{File: p.Spec.File, Key: "pipelines", Err: err}
					}
					mTrain := 0
					for _, sp := range d.Splits {
						mTrain = max(mTrain, len(sp.Train))
					}
					// Features after the pipeline: an upper bound after pca(f).
					dim, err := pipe.CheckDims(mTrain, d.Data.Dim())
					if err != nil {
						return &input.Error{File: p.Spec.File, Line: p.Spec.LineOf("pipelines"), Key: "pipelines", Err: err}
					}
					if q.TrainSubset > 0 {
						mTrain = min(mTrain, q.TrainSubset)
					}
					ni, nd, nc := circuit.RegisterSizes(mTrain, dim, len(d.Data.Classes))
					if n := 1 + ni + nd + nc; n > limit {
						key := fmt.Sprintf("model[%d]", mi+1)
						return &input.Error{File: p.Spec.File, Line: p.Spec.LineOf(key), Key: key,
							Err: fmt.Errorf("model %s on dataset %s, pipeline %s: the circuit needs %d qubits (%d training vectors, %d features); the %s at most %d; %s: %w",
								m.Name, d.Name, ps, n, mTrain, dim, simName, limit, alt, qkernel.ErrTooLarge)}
					}
				}
			}
		}
	}
	return nil
}

// Fits is the number of model fits task t runs: 1, or for a tuned model
// one per grid point and inner fold, plus the refit on the whole outer
// training part. Progress and cost estimates count fits, not tasks.
func (p *Plan) Fits(t Task) int {
	m := p.Spec.Models[t.Model]
	if m.Grid == nil {
		return 1
	}
	return 1 + len(m.Grid.Points)*p.Spec.Tune.Folds
}

// FitsOf is the number of model fits of the tasks (indices into Tasks).
func (p *Plan) FitsOf(tasks []int) int {
	n := 0
	for _, i := range tasks {
		n += p.Fits(p.Tasks[i])
	}
	return n
}
