package modelkit

import (
	"context"

	"gonum.org/v1/gonum/mat"

	"fringe/bench/cv"
	"fringe/datasets"
	"fringe/qkernel"
)

// TaskContext is what a model learns about its task beyond the matrices
// that Fit and Predict receive: where the rows come from, how the features
// and classes are named, the task's seeds and the run's context. Models
// that run outside the process (kind "command") or read measured outcomes
// (kind "counts") need it; the runner hands it to every model that
// implements TaskAware, right after building the model and before Fit.
type TaskContext struct {
	Ctx      context.Context // cancelled when the run stops
	Key      string          // the task key dataset/pipeline/model/repeat/fold
	Model    string          // the model's display name
	Dataset  string          // the dataset's display name
	Pipeline string
	Repeat   int
	Fold     int
	Features []string // feature names after the pipeline
	Classes  []string // the dataset's classes, in class order
	// TrainRows and TestRows are the dataset rows (0-based, as loaded) of
	// the rows of the matrices passed to Fit and Predict, in that order.
	TrainRows, TestRows []int
	// Seed is the task's model seed (the one Spec.New receives).
	Seed uint64
	// InterferenceSeed is the seed every interference model of the run
	// gets on this split; the circuits of `fringe circuit -export` draw
	// their training subsets from it, and so does a counts model.
	InterferenceSeed uint64
	// Dir is the folder relative paths of the spec are resolved against
	// ("" is the working directory).
	Dir string
	// Layout describes the whole run the task belongs to; a counts model
	// checks its file against it. The same *Layout is handed to every
	// task of a run.
	Layout *Layout
}

// TaskAware is implemented by models that need their TaskContext.
type TaskAware interface {
	SetTask(TaskContext)
}

// Detailer is implemented by models that report per-prediction details
// (post-selection probability, shots, class probabilities, the exact-mode
// decision): the interference classifier, counts and command models.
type Detailer interface {
	PredictDetail(X *mat.Dense) ([]int, []qkernel.Detail, error)
}

// Layout is what a model may know of the whole run it is part of: the
// pipelines and, per dataset, its data as loaded (rows and classes after
// selection) and its splits. A counts model checks its file against every
// test instance of the run. The planner builds it once per plan.
type Layout struct {
	Dir       string   // the folder relative paths are resolved against
	Pipelines []string // in spec order
	Datasets  []LayoutDataset
}

// LayoutDataset is one dataset of a Layout.
type LayoutDataset struct {
	Name   string // display name
	Data   *datasets.Dataset
	Splits []cv.Split // in (repeat, fold) order
}

// dataset returns the dataset with the display name, or nil.
func (l *Layout) dataset(name string) *LayoutDataset {
	for i := range l.Datasets {
		if l.Datasets[i].Name == name {
			return &l.Datasets[i]
		}
	}
	return nil
}
