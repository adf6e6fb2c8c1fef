package modelkit_test

import (
	"math"
	"testing"

	"fringe/bench/internal/benchtest"
	"fringe/bench/modelkit"
)

// FuzzModelParams feeds one [[model]] table with a fuzzed kind and one
// fuzzed key of every TOML value type a spec can hold to the model
// parameter parser. It must never panic; an accepted table must build a
// model with a non-empty name.
func FuzzModelParams(f *testing.F) {
	for _, kind := range []string{"knn", "svm", "logreg", "centroid", "interference", "forest", ""} {
		for _, key := range []string{"k", "metric", "weights", "kernel", "C", "gamma", "degree", "coef0", "tol", "max_iter",
			"mode", "balance", "shots", "train_subset", "noise", "method", "trajectories", "name", "kind", "bogus",
			"vote", "offset", "simulator"} {
			f.Add(kind, key, int64(3), 0.5, "rbf", true, uint8(0))
		}
	}
	f.Add("interference", "noise", int64(1), 0.01, "depolarizing", false, uint8(4))
	f.Add("interference", "noise", int64(1), 0.01, "readout", false, uint8(5))
	f.Add("svm", "gamma", int64(1), math.Inf(1), "scale", false, uint8(1))
	f.Add("svm", "gamma", int64(1), 0.5, "inverse-variance", false, uint8(2))
	f.Add("knn", "weights", int64(1), 0.5, "distance", false, uint8(2))
	f.Add("knn", "vote", int64(1), 0.5, "inverse-distance", false, uint8(6))
	f.Add("interference", "method", int64(1), 0.5, "density", false, uint8(2))
	f.Add("interference", "simulator", int64(1), 0.5, "statevector", false, uint8(2))
	f.Add("knn", "k", int64(-1<<40), math.NaN(), "", false, uint8(2))
	f.Fuzz(func(t *testing.T, kind, key string, i int64, x float64, s string, b bool, which uint8) {
		defer benchtest.Watchdog("modelkit.Parse")()
		var v any
		switch which % 8 {
		case 0:
			v = i
		case 1:
			v = x
		case 2:
			v = s
		case 3:
			v = b
		case 4:
			v = map[string]any{s: x}
		case 5:
			v = map[string]any{s: []any{x, float64(i)}}
		case 6:
			v = []any{x, i, s}
		case 7:
			v = map[string]any{s: map[string]any{"deep": i}}
		}
		table := map[string]any{"kind": kind, key: v}
		if key == "kind" {
			table = map[string]any{"kind": v}
		}
		ms, err := modelkit.Parse(table)
		if err != nil {
			if err.Error() == "" {
				t.Fatal("empty error message")
			}
			return
		}
		if ms.Name == "" {
			t.Fatalf("accepted %v with an empty name", table)
		}
		if m := ms.New(1); m == nil {
			t.Fatalf("accepted %v but builds no model", table)
		}
	})
}
