package bench

import (
	"context"
	"fmt"

	"fringe/bench/modelkit"
	"fringe/datasets"
)

// taskContext describes task t for a TaskAware model; rowsTr and rowsTe are
// the dataset rows of the task's training and test matrices.
func (p *Plan) taskContext(ctx context.Context, t Task, rowsTr, rowsTe []int) modelkit.TaskContext {
	d := p.Datasets[t.Dataset]
	sp := d.Splits[t.Split]
	ps := p.Spec.Pipelines[t.Pipeline]
	features := d.Data.Features
	if pipe, err := datasets.ParsePipeline(ps); err == nil { // runUnit parsed it already
		features = pipe.FeatureNames(d.Data.Features)
	}
	return modelkit.TaskContext{
		Ctx: ctx, Key: p.Key(t), Model: p.Spec.Models[t.Model].Name,
		Dataset: d.Name, Pipeline: ps, Repeat: sp.Repeat, Fold: sp.Fold,
		Features: features, Classes: d.Data.Classes,
		TrainRows: rowsTr, TestRows: rowsTe,
		Seed: p.modelSeed(t), InterferenceSeed: p.interferenceSeed(t.Dataset, t.Split),
		Dir: p.Spec.Dir, Layout: p.layout,
	}
}

// interferenceSeed is the seed of the interference models on split si of
// dataset di: the value modelSeed gives them (tested), so that exported
// circuits, counts models and simulated shots draw the same training
// subsets and random streams.
func (p *Plan) interferenceSeed(di, si int) uint64 {
	d := p.Datasets[di]
	sp := d.Splits[si]
	return Seed(p.Spec.Seed, "interference", d.Name, fmt.Sprint(sp.Repeat), fmt.Sprint(sp.Fold))
}

// newLayout describes the plan for models (modelkit.Layout).
func (p *Plan) newLayout() *modelkit.Layout {
	l := &modelkit.Layout{Dir: p.Spec.Dir, Pipelines: p.Spec.Pipelines}
	for _, d := range p.Datasets {
		l.Datasets = append(l.Datasets, modelkit.LayoutDataset{Name: d.Name, Data: d.Data, Splits: d.Splits})
	}
	return l
}
