package modelkit_test

import (
	"errors"
	"reflect"
	"strings"
	"testing"

	"fringe/baselines"
	"fringe/bench/modelkit"
	"fringe/qkernel"
	"fringe/qkernel/sim"
)

// TestRespelledTablesParseAlike parses every old spelling of a renamed key
// or value beside the same table in the current spelling: both must give
// the same name, parameters, grid and built model, and only the old one
// lists deprecations, each naming the key as written and the new
// spelling.
func TestRespelledTablesParseAlike(t *testing.T) {
	for _, c := range []struct {
		name     string
		old, cur map[string]any
		deps     []modelkit.Deprecation
	}{
		{"knn distance",
			map[string]any{"kind": "knn", "k": int64(3), "weights": "distance"},
			map[string]any{"kind": "knn", "k": int64(3), "vote": "inverse-distance"},
			[]modelkit.Deprecation{{Key: "weights", Message: `weights = "distance" is deprecated and will not be read by the next release; write vote = "inverse-distance"`}}},
		{"knn uniform",
			map[string]any{"kind": "knn", "weights": "uniform"},
			map[string]any{"kind": "knn", "vote": "equal"},
			[]modelkit.Deprecation{{Key: "weights", Message: `weights = "uniform" is deprecated and will not be read by the next release; write vote = "equal"`}}},
		{"knn folded case (the old parser ignored case and space)",
			map[string]any{"kind": "knn", "weights": " Distance "},
			map[string]any{"kind": "knn", "vote": "inverse-distance"},
			[]modelkit.Deprecation{{Key: "weights", Message: `weights = " Distance " is deprecated and will not be read by the next release; write vote = "inverse-distance"`}}},
		{"svm gamma and offset",
			map[string]any{"kind": "svm", "kernel": "poly", "gamma": "scale", "coef0": 1.0, "degree": int64(2)},
			map[string]any{"kind": "svm", "kernel": "poly", "gamma": "inverse-variance", "offset": 1.0, "degree": int64(2)},
			[]modelkit.Deprecation{
				{Key: "gamma", Message: `gamma = "scale" is deprecated and will not be read by the next release; write gamma = "inverse-variance"`},
				{Key: "coef0", Message: `coef0 = 1.0 is deprecated and will not be read by the next release; write offset = 1.0`},
			}},
		{"svm offset as an integer",
			map[string]any{"kind": "svm", "kernel": "poly", "coef0": int64(-2)},
			map[string]any{"kind": "svm", "kernel": "poly", "offset": int64(-2)},
			[]modelkit.Deprecation{{Key: "coef0", Message: `coef0 = -2 is deprecated and will not be read by the next release; write offset = -2`}}},
		{"svm gamma grid",
			map[string]any{"kind": "svm", "C": []any{int64(1), int64(10)}, "gamma": []any{"scale", 0.5}},
			map[string]any{"kind": "svm", "C": []any{int64(1), int64(10)}, "gamma": []any{"inverse-variance", 0.5}},
			[]modelkit.Deprecation{{Key: "gamma", Message: `gamma = ["scale", 0.5] is deprecated and will not be read by the next release; write gamma = ["inverse-variance", 0.5]`}}},
		{"knn vote grid",
			map[string]any{"kind": "knn", "weights": []any{"uniform", "distance"}},
			map[string]any{"kind": "knn", "vote": []any{"equal", "inverse-distance"}},
			[]modelkit.Deprecation{{Key: "weights", Message: `weights = ["uniform", "distance"] is deprecated and will not be read by the next release; write vote = ["equal", "inverse-distance"]`}}},
		{"interference density matrix",
			map[string]any{"kind": "interference", "mode": "noisy", "train_subset": int64(4), "method": "density", "noise": map[string]any{"depolarizing": []any{0.001, 0.01}}},
			map[string]any{"kind": "interference", "mode": "noisy", "train_subset": int64(4), "simulator": "density-matrix", "noise": map[string]any{"depolarizing": []any{0.001, 0.01}}},
			[]modelkit.Deprecation{{Key: "method", Message: `method = "density" is deprecated and will not be read by the next release; write simulator = "density-matrix"`}}},
		{"interference state vector",
			map[string]any{"kind": "interference", "mode": "noisy", "method": "statevector"},
			map[string]any{"kind": "interference", "mode": "noisy", "simulator": "state-vector"},
			[]modelkit.Deprecation{{Key: "method", Message: `method = "statevector" is deprecated and will not be read by the next release; write simulator = "state-vector"`}}},
		{"interference trajectories (only the key renamed)",
			map[string]any{"kind": "interference", "mode": "noisy", "method": "trajectories", "trajectories": int64(50), "noise": map[string]any{"phase_damping": 0.01}},
			map[string]any{"kind": "interference", "mode": "noisy", "simulator": "trajectories", "trajectories": int64(50), "noise": map[string]any{"phase_damping": 0.01}},
			[]modelkit.Deprecation{{Key: "method", Message: `method = "trajectories" is deprecated and will not be read by the next release; write simulator = "trajectories"`}}},
		{"old value under the new key",
			map[string]any{"kind": "interference", "mode": "noisy", "simulator": "density"},
			map[string]any{"kind": "interference", "mode": "noisy", "simulator": "density-matrix"},
			[]modelkit.Deprecation{{Key: "simulator", Message: `simulator = "density" is deprecated and will not be read by the next release; write simulator = "density-matrix"`}}},
	} {
		t.Run(c.name, func(t *testing.T) {
			before := len(c.old)
			o, err := modelkit.Parse(c.old)
			if err != nil {
				t.Fatalf("old spelling %v: %v", c.old, err)
			}
			if len(c.old) != before {
				t.Errorf("Parse changed its argument: %v", c.old)
			}
			n, err := modelkit.Parse(c.cur)
			if err != nil {
				t.Fatalf("new spelling %v: %v", c.cur, err)
			}
			if o.Name != n.Name {
				t.Errorf("names differ: old %q, new %q", o.Name, n.Name)
			}
			if !reflect.DeepEqual(o.Params, n.Params) {
				t.Errorf("params differ:\nold %v\nnew %v", o.Params, n.Params)
			}
			if !reflect.DeepEqual(o.New(7), n.New(7)) {
				t.Errorf("built models differ:\nold %+v\nnew %+v", o.New(7), n.New(7))
			}
			if (o.Grid == nil) != (n.Grid == nil) {
				t.Fatalf("one is tuned, the other not")
			}
			if o.Grid != nil {
				if !reflect.DeepEqual(o.Grid.Keys, n.Grid.Keys) || len(o.Grid.Points) != len(n.Grid.Points) {
					t.Fatalf("grids differ: %v / %d points, %v / %d points", o.Grid.Keys, len(o.Grid.Points), n.Grid.Keys, len(n.Grid.Points))
				}
				for i := range o.Grid.Points {
					if o.Grid.Label(i) != n.Grid.Label(i) || !reflect.DeepEqual(o.Grid.Points[i].Spec.New(1), n.Grid.Points[i].Spec.New(1)) {
						t.Errorf("grid point %d: %q %+v, want %q %+v", i, o.Grid.Label(i), o.Grid.Points[i].Spec.New(1), n.Grid.Label(i), n.Grid.Points[i].Spec.New(1))
					}
				}
			}
			if !reflect.DeepEqual(o.Deprecated, c.deps) {
				t.Errorf("deprecations\n%q\nwant\n%q", o.Deprecated, c.deps)
			}
			if len(n.Deprecated) != 0 {
				t.Errorf("the current spelling lists deprecations: %q", n.Deprecated)
			}
			if r := modelkit.Respell(c.old); !reflect.DeepEqual(r, c.cur) {
				t.Errorf("Respell(%v) = %v, want %v", c.old, r, c.cur)
			}
		})
	}
}

// TestRespelledModels checks what the new spellings mean, on the models
// they build: the vote rule, the offset of the polynomial kernel, the
// gamma rule (0 in baselines.SVM), and the simulator.
func TestRespelledModels(t *testing.T) {
	parse := func(m map[string]any) any {
		t.Helper()
		ms, err := modelkit.Parse(m)
		if err != nil {
			t.Fatalf("%v: %v", m, err)
		}
		return ms.New(3)
	}
	if k := parse(map[string]any{"kind": "knn", "vote": "inverse-distance"}).(*baselines.KNN); k.Weights != baselines.Distance {
		t.Errorf("vote inverse-distance builds weighting %v", k.Weights)
	}
	if k := parse(map[string]any{"kind": "knn"}).(*baselines.KNN); k.Weights != baselines.Uniform {
		t.Errorf("the default vote builds weighting %v, want one vote each", k.Weights)
	}
	s := parse(map[string]any{"kind": "svm", "kernel": "poly", "offset": 2.5}).(*baselines.SVM)
	if s.Coef0 != 2.5 || s.Gamma != 0 {
		t.Errorf("offset 2.5 builds Coef0 %v, Gamma %v; want 2.5 and 0 (the inverse-variance rule)", s.Coef0, s.Gamma)
	}
	for name, want := range map[string]sim.Method{"auto": sim.Auto, "density-matrix": sim.DensityMatrix, "trajectories": sim.Trajectories, "state-vector": sim.StateVector} {
		q := parse(map[string]any{"kind": "interference", "mode": "noisy", "simulator": name}).(*qkernel.Classifier)
		if q.Method != want || q.Method.String() != name {
			t.Errorf("simulator %q builds %v", name, q.Method)
		}
	}
}

// TestRespellErrors checks both spellings of a key at once, unknown values
// (whose messages list the new names), and errors about a key written in
// its old spelling (which name the key as written, so the spec parser
// finds its line).
func TestRespellErrors(t *testing.T) {
	for _, c := range []struct {
		table map[string]any
		key   string
		want  []string
	}{
		{map[string]any{"kind": "knn", "weights": "distance", "vote": "equal"}, "weights", []string{"both vote and its old spelling weights", "keep vote only"}},
		{map[string]any{"kind": "svm", "coef0": 1.0, "offset": 1.0}, "coef0", []string{"both offset and its old spelling coef0"}},
		{map[string]any{"kind": "interference", "method": "auto", "simulator": "auto"}, "method", []string{"both simulator and its old spelling method"}},
		{map[string]any{"kind": "knn", "vote": "majority"}, "vote", []string{`"majority"`, "equal", "inverse-distance"}},
		{map[string]any{"kind": "knn", "weights": "majority"}, "weights", []string{`"majority"`, "equal", "inverse-distance"}},
		{map[string]any{"kind": "svm", "gamma": "auto"}, "gamma", []string{`"auto"`, `"inverse-variance"`}},
		{map[string]any{"kind": "interference", "mode": "noisy", "simulator": "mps"}, "simulator", []string{`"mps"`, "density-matrix", "state-vector", "trajectories"}},
		{map[string]any{"kind": "interference", "mode": "noisy", "method": "mps"}, "method", []string{`"mps"`, "density-matrix", "state-vector"}},
		// Validation in qkernel names the option by its new key; the
		// error names the key as written.
		{map[string]any{"kind": "interference", "mode": "noisy", "method": "statevector", "noise": map[string]any{"phase_damping": 0.1}}, "method", []string{"state-vector simulator is noiseless", `"density-matrix"`}},
		{map[string]any{"kind": "interference", "mode": "exact", "simulator": "density-matrix"}, "simulator", []string{"ignores it"}},
		{map[string]any{"kind": "svm", "kernel": "poly", "coef0": 1e7}, "coef0", []string{"offset = 1e+07 is outside"}},
		{map[string]any{"kind": "svm", "kernel": "poly", "offset": 1e7}, "offset", []string{"offset = 1e+07 is outside"}},
		// A tuned key in its old spelling: the value's position is named.
		{map[string]any{"kind": "knn", "weights": []any{"uniform", "nearest"}}, "weights", []string{"value 2", `"nearest"`}},
	} {
		_, err := modelkit.Parse(c.table)
		var ke *modelkit.KeyError
		if !errors.As(err, &ke) {
			t.Errorf("%v: error %v, want a *KeyError", c.table, err)
			continue
		}
		if ke.Key != c.key {
			t.Errorf("%v: key %q, want %q (%v)", c.table, ke.Key, c.key, err)
		}
		for _, w := range c.want {
			if !strings.Contains(err.Error(), w) {
				t.Errorf("%v: error %q lacks %q", c.table, err, w)
			}
		}
	}
}

// TestRespellScope checks that a renamed key of one kind is not renamed in
// another: gamma = "scale" means nothing to k-NN, and weights is no key
// of an SVM.
func TestRespellScope(t *testing.T) {
	for _, m := range []map[string]any{
		{"kind": "knn", "gamma": "scale"},
		{"kind": "svm", "weights": "distance"},
		{"kind": "logreg", "coef0": 1.0},
	} {
		if _, err := modelkit.Parse(m); err == nil || !strings.Contains(err.Error(), "unknown key") {
			t.Errorf("%v: error %v, want an unknown key", m, err)
		}
		if r := modelkit.Respell(m); !reflect.DeepEqual(r, m) {
			t.Errorf("Respell(%v) = %v, want it unchanged", m, r)
		}
	}
}

// TestInfosUseNewNames checks that `fringe list` describes the current
// spellings, with their formulas, and none of the old ones.
func TestInfosUseNewNames(t *testing.T) {
	var all strings.Builder
	for _, in := range modelkit.Infos() {
		all.WriteString(in.Keys + " " + in.Description + "\n")
	}
	text := all.String()
	for _, w := range []string{"vote", "inverse-distance", "offset", "inverse-variance", "1/(d*Var(X))", "(gamma*<x,x'> + offset)^degree", "simulator", "density-matrix", "state-vector"} {
		if !strings.Contains(text, w) {
			t.Errorf("model descriptions lack %q", w)
		}
	}
	for _, old := range []string{"coef0", "\"scale\"", "statevector", "uniform|distance", "weights uniform"} {
		if strings.Contains(text, old) {
			t.Errorf("model descriptions still use the old spelling %q", old)
		}
	}
	for _, in := range modelkit.Infos() {
		for _, k := range strings.Split(in.Keys, ", ") {
			for _, r := range modelkit.Respellings {
				if r.Kind == in.Kind && r.Old != r.New && k == r.Old {
					t.Errorf("kind %s lists its old key %q", in.Kind, k)
				}
			}
		}
	}
}
