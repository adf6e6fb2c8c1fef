package plan

import (
	"context"

	"fringe/bench/modelkit"
)

// TaskContext describes task t for a TaskAware model; pr is the task's
// prepared split (its rows and the feature names after the pipeline).
func (p *Plan) TaskContext(ctx context.Context, t Task, pr *Prepared) modelkit.TaskContext {
	d := p.Datasets[t.Dataset]
	sp := d.Splits[t.Split]
	return modelkit.TaskContext{
		Ctx: ctx, Key: p.Key(t), Model: p.Spec.Models[t.Model].Name,
		Dataset: d.Name, Pipeline: p.Spec.Pipelines[t.Pipeline], Repeat: sp.Repeat, Fold: sp.Fold,
		Features: pr.Features, Classes: d.Data.Classes,
		TrainRows: pr.RowsTr, TestRows: pr.RowsTe,
		Seed: p.ModelSeed(t), InterferenceSeed: p.InterferenceSeed(t.Dataset, t.Split),
		Dir: p.Spec.Dir, Layout: p.layout,
	}
}

// newLayout describes the plan for models (modelkit.Layout).
func (p *Plan) newLayout() *modelkit.Layout {
	l := &modelkit.Layout{Dir: p.Spec.Dir, Pipelines: p.Spec.Pipelines}
	for _, d := range p.Datasets {
		l.Datasets = append(l.Datasets, modelkit.LayoutDataset{Name: d.Name, Data: d.Data, Splits: d.Splits})
	}
	return l
}
