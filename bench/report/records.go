package report

import "fringe/results"

// cellID identifies a (dataset, pipeline, model) cell.
type cellID struct{ dataset, pipeline, model string }

// foldKey identifies a split within a dataset.
type foldKey struct{ repeat, fold int }

// instKey identifies a test instance within a dataset: its repeat and row.
type instKey struct{ repeat, row int }

func idOf(s results.Summary) cellID { return cellID{s.Dataset, s.Pipeline, s.Model} }

// foldsByCell indexes fold records by cell and (repeat, fold).
func foldsByCell(folds []results.Fold) map[cellID]map[foldKey]results.Fold {
	out := map[cellID]map[foldKey]results.Fold{}
	for _, f := range folds {
		id := cellID{f.Dataset, f.Pipeline, f.Model}
		if out[id] == nil {
			out[id] = map[foldKey]results.Fold{}
		}
		out[id][foldKey{f.Repeat, f.Fold}] = f
	}
	return out
}

// correctByCell records, per cell and test instance (repeat, row), whether
// the prediction was right.
func correctByCell(preds []results.Prediction) map[cellID]map[instKey]bool {
	out := map[cellID]map[instKey]bool{}
	var last cellID
	var cell map[instKey]bool // out[last]; consecutive predictions mostly share their cell
	for _, p := range preds {
		if id := (cellID{p.Dataset, p.Pipeline, p.Model}); cell == nil || id != last {
			if cell = out[id]; cell == nil {
				cell = map[instKey]bool{}
				out[id] = cell
			}
			last = id
		}
		cell[instKey{p.Repeat, p.Row}] = p.Label == p.Predicted
	}
	return out
}
