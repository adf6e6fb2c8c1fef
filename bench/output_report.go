package bench

import (
	"fringe/bench/plan"
	"fringe/bench/report"
	"fringe/results"
)

// Report analyses a finished run: report.Analyse on its records.
func Report(p *plan.Plan, res []TaskResult) (*results.Report, error) {
	preds, folds, _ := Records(p, res)
	return report.Analyse(reportInput(p, res, preds, folds))
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
	return in
}
