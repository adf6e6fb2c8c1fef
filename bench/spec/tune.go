package spec

import (
	"strings"

	"fringe/bench/modelkit"
	"fringe/results"
)

// Tune is the inner protocol of the tuned models of a spec (a model with a
// list of values for a key, see modelkit.Grid): stratified k-fold
// cross-validation with Folds folds on every outer training part, scored
// by the metric MetricNames[Metric]; the grid point with the highest mean
// inner score is refitted on the whole outer training part (ties to the
// first point in grid order).
type Tune struct {
	Folds  int // inner folds, default 5
	Metric int // index into results.MetricNames, default 0 (accuracy)
}

// MetricName is the name of the tuning metric.
func (t Tune) MetricName() string { return results.MetricNames[t.Metric] }

// Tuned reports whether any model of the spec is tuned.
func (s *Spec) Tuned() bool {
	for _, m := range s.Models {
		if m.Grid != nil {
			return true
		}
	}
	return false
}

// parseTune reads the [tune] table (nil: the defaults), which only a spec
// with a tuned model may hold.
func parseTune(raw *rawTune, models []modelkit.Spec, bad func(key, format string, args ...any) error) (Tune, error) {
	t := Tune{Folds: 5}
	if raw == nil {
		return t, nil
	}
	tuned := false
	for _, m := range models {
		tuned = tuned || m.Grid != nil
	}
	if !tuned {
		return t, bad("tune", "[tune] sets the inner cross-validation of tuned models, and no model is tuned (give a key a list of values, e.g. C = [0.1, 1, 10])")
	}
	if raw.Folds != nil {
		if *raw.Folds < 2 {
			return t, bad("tune.folds", "inner folds must be at least 2, got %d", *raw.Folds)
		}
		t.Folds = *raw.Folds
	}
	if raw.Metric != nil {
		found := false
		for i, n := range results.MetricNames {
			if n == *raw.Metric {
				t.Metric, found = i, true
			}
		}
		if !found {
			return t, bad("tune.metric", "unknown metric %q (want %s)", *raw.Metric, strings.Join(results.MetricNames, ", "))
		}
	}
	return t, nil
}
