package plan

import (
	"errors"
	"fmt"

	"gonum.org/v1/gonum/mat"

	"fringe/baselines"
	"fringe/bench/input"
	"fringe/datasets"
	"fringe/qkernel"
)

// Gather copies the rows idx of a dataset into a new matrix, with their
// labels and their dataset row ids.
func Gather(d *datasets.Dataset, idx []int) (*mat.Dense, []int, []int) {
	c := d.Dim()
	X := mat.NewDense(len(idx), c, nil)
	y := make([]int, len(idx))
	rows := make([]int, len(idx))
	for i, j := range idx {
		copy(X.RawRowView(i), d.X.RawRowView(j))
		y[i] = d.Y[j]
		rows[i] = d.Rows[j]
	}
	return X, y, rows
}

// classify marks pipeline errors that stem from the data as input errors.
// An error about one row of the data names the row's source, file and
// line (datasets.Dataset.LocateError), where the dataset has one; else the
// spec.
func (p *Plan) classify(d *datasets.Dataset, err error, where string) error {
	if errors.Is(err, datasets.ErrZeroVector) || errors.Is(err, datasets.ErrUnknownStep) ||
		errors.Is(err, datasets.ErrStepParam) || errors.Is(err, datasets.ErrNotFiniteValue) ||
		errors.Is(err, datasets.ErrStepData) {
		file := p.Spec.File
		if at, ok := d.LocateError(err); ok {
			file = at
		}
		return &input.Error{File: file, Err: fmt.Errorf("%s: %w", where, err)}
	}
	return fmt.Errorf("%s: %w", where, err)
}

// ClassifyModel marks model errors caused by the data or parameters as input
// errors, and maps a vector's position to its dataset row.
func (p *Plan) ClassifyModel(err error, where, model string, rows []int) error {
	var ve *qkernel.VectorError
	if errors.As(err, &ve) && ve.Pos >= 0 && ve.Pos < len(rows) {
		err = fmt.Errorf("dataset row %d: %w", rows[ve.Pos], err)
	}
	err = fmt.Errorf("%s, model %s: %w", where, model, err)
	if errors.Is(err, baselines.ErrParam) || errors.Is(err, baselines.ErrData) ||
		errors.Is(err, qkernel.ErrZeroVector) || errors.Is(err, qkernel.ErrOneClass) ||
		errors.Is(err, qkernel.ErrTooLarge) || errors.Is(err, qkernel.ErrSubset) || errors.Is(err, qkernel.ErrOption) {
		return &input.Error{File: p.Spec.File, Err: err}
	}
	return err
}

// Prepared is one split of one dataset under one pipeline, ready for the
// models: the pipeline fitted on the training part and applied to both
// parts. Models never modify these matrices, so one Prepared serves every
// model of the split.
type Prepared struct {
	Where    string     // "dataset D, pipeline P, repeat R fold F", for messages
	Features []string   // feature names after the pipeline
	Ztr      *mat.Dense // the transformed training part, in split order
	Ytr      []int      // its class indices
	RowsTr   []int      // its dataset rows (0-based, as loaded)
	Zte      *mat.Dense // the transformed test part, in split order
	RowsTe   []int      // its dataset rows
}

// Prepare fits pipeline pi on the training part of split si of dataset di
// and transforms both parts. Errors that stem from the data (a zero vector
// to normalise, a non-finite value after a step, a step that does not fit
// the data) are input errors naming the dataset, pipeline and split.
func (p *Plan) Prepare(di, pi, si int) (*Prepared, error) {
	return p.prepare(Task{Dataset: di, Pipeline: pi, Split: si})
}

// PrepareTask is Prepare for the split and training part of task t: a
// learning-curve task's pipeline is fitted on its subsample only.
func (p *Plan) PrepareTask(t Task) (*Prepared, error) { return p.prepare(t) }

func (p *Plan) prepare(t Task) (*Prepared, error) {
	d := p.Datasets[t.Dataset]
	sp := d.Splits[t.Split]
	ps := p.Spec.Pipelines[t.Pipeline]
	pipe, err := datasets.ParsePipeline(ps)
	if err != nil {
		return nil, &input.Error{File: p.Spec.File, Key: "pipelines", Err: err}
	}
	pr := &Prepared{Where: fmt.Sprintf("dataset %s, pipeline %s, repeat %d fold %d", d.Name, ps, sp.Repeat, sp.Fold)}
	if t.Size > 0 {
		pr.Where += fmt.Sprintf(", training size %g", p.TrainSize(t))
	}
	Xtr, ytr, rowsTr := Gather(d.Data, p.TrainRows(t))
	Xte, _, rowsTe := Gather(d.Data, sp.Test)
	Ztr, err := pipe.FitTransformLabeled(Xtr, ytr, rowsTr)
	if err != nil {
		return nil, p.classify(d.Data, err, pr.Where)
	}
	Zte, err := pipe.Transform(Xte, rowsTe)
	if err != nil {
		return nil, p.classify(d.Data, err, pr.Where)
	}
	pr.Features = pipe.FeatureNames(d.Data.Features) // after the fit: pca(f) knows its width only then
	pr.Ztr, pr.Ytr, pr.RowsTr, pr.Zte, pr.RowsTe = Ztr, ytr, rowsTr, Zte, rowsTe
	return pr, nil
}

// Sub is the part of a prepared split that an inner fold sees: training
// rows at the positions train of pr's training part, test rows at the
// positions test of it (an inner fold never sees the outer test part).
func (pr *Prepared) Sub(train, test []int, where string) *Prepared {
	pick := func(idx []int) (*mat.Dense, []int, []int) {
		_, c := pr.Ztr.Dims()
		Z := mat.NewDense(len(idx), c, nil)
		y := make([]int, len(idx))
		rows := make([]int, len(idx))
		for i, j := range idx {
			copy(Z.RawRowView(i), pr.Ztr.RawRowView(j))
			y[i], rows[i] = pr.Ytr[j], pr.RowsTr[j]
		}
		return Z, y, rows
	}
	out := &Prepared{Where: where, Features: pr.Features}
	out.Ztr, out.Ytr, out.RowsTr = pick(train)
	out.Zte, _, out.RowsTe = pick(test)
	return out
}

// Then applies the steps pipe (a model's own pipeline) after pr's, fitted
// on pr's training part; errors are classified as Prepare's.
func (p *Plan) Then(pr *Prepared, di int, pipe string) (*Prepared, error) {
	if pipe == "" {
		return pr, nil
	}
	pl, err := datasets.ParsePipeline(pipe)
	if err != nil {
		return nil, &input.Error{File: p.Spec.File, Err: err}
	}
	d := p.Datasets[di]
	where := pr.Where + ", then " + pipe
	Ztr, err := pl.FitTransformLabeled(pr.Ztr, pr.Ytr, pr.RowsTr)
	if err != nil {
		return nil, p.classify(d.Data, err, where)
	}
	Zte, err := pl.Transform(pr.Zte, pr.RowsTe)
	if err != nil {
		return nil, p.classify(d.Data, err, where)
	}
	return &Prepared{Where: where, Features: pl.FeatureNames(pr.Features), Ztr: Ztr, Ytr: pr.Ytr, RowsTr: pr.RowsTr, Zte: Zte, RowsTe: pr.RowsTe}, nil
}
