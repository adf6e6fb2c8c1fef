package plan_test

import (
	"errors"
	"strings"
	"testing"

	"fringe/bench/input"
	"fringe/bench/internal/benchtest"
)

// TestCheckMemory checks the plan-time memory refusal: the estimate of the
// largest task times the workers plus the loaded data against the limit,
// refused with an input error naming the model's key (cache_mib for an SVM
// whose cache is smaller than its kernel matrix, train_subset for a model
// simulated gate by gate, the model otherwise), and accepted below it.
func TestCheckMemory(t *testing.T) {
	cases := []struct {
		name, spec, key string
	}{
		{"knn", "name = \"m\"\nseed = 1\ndatasets = [\"digits\"]\n[cv]\nfolds = 5\n[[model]]\nkind = \"centroid\"\n[[model]]\nkind = \"knn\"\n", "model[2]"},
		{"svm", "name = \"m\"\nseed = 1\ndatasets = [\"digits\"]\n[cv]\nfolds = 5\n[[model]]\nkind = \"svm\"\ncache_mib = 4\n", "model[1].cache_mib"},
		{"svm-small", "name = \"m\"\nseed = 1\ndatasets = [\"iris\"]\n[cv]\nfolds = 5\n[[model]]\nkind = \"svm\"\n", "model[1]"},
		{"density", "name = \"m\"\nseed = 1\ndatasets = [\"iris\"]\n[cv]\nfolds = 5\n[[model]]\nkind = \"interference\"\nmode = \"noisy\"\nmethod = \"density\"\nnoise = { depolarizing = [0.001, 0.01] }\n", "model[1].train_subset"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			p := benchtest.Plan(t, "m.toml", c.spec)
			var worst int64
			for mi := range p.Spec.Models {
				m, err := p.TaskMemory(mi)
				if err != nil {
					t.Fatal(err)
				}
				if m.Bytes != m.Model+m.Data || m.Model < 0 || m.Data <= 0 {
					t.Errorf("model %d: estimate %+v: want parts that add up, prepared data positive", mi, m)
				}
				worst = max(worst, m.Bytes)
			}
			data := p.DataBytes()
			for _, workers := range []int{1, 3} {
				need := data + int64(workers)*worst
				if err := p.CheckMemory(workers, need); err != nil {
					t.Errorf("%d workers, limit at the estimate %d: %v", workers, need, err)
				}
				err := p.CheckMemory(workers, need-1)
				var ie *input.Error
				if !errors.As(err, &ie) || !errors.Is(err, input.ErrBad) {
					t.Fatalf("%d workers, limit one byte below the estimate: error %v, want an input error", workers, err)
				}
				if ie.Key != c.key || ie.Line == 0 {
					t.Errorf("%d workers: key %q line %d, want key %q on its line", workers, ie.Key, ie.Line, c.key)
				}
				for _, w := range []string{"per task", "workers at once", "above the memory limit", "raise -memory"} {
					if !strings.Contains(err.Error(), w) {
						t.Errorf("message %q lacks %q", err, w)
					}
				}
			}
		})
	}
}

// TestTaskMemoryGrows checks that a task's estimate follows its data: more
// rows (digits against iris) give more bytes for every model, and the
// density-matrix model grows by about 4 per added qubit of its circuit
// (train_subset 16 against 64 training vectors: 8 against 10 qubits, the
// matrices 4^7 against 4^9 entries).
func TestTaskMemoryGrows(t *testing.T) {
	head := "name = \"m\"\nseed = 1\n[cv]\nfolds = 5\n"
	models := "[[model]]\nkind = \"knn\"\n[[model]]\nkind = \"logreg\"\n[[model]]\nkind = \"svm\"\n[[model]]\nkind = \"interference\"\n"
	small := benchtest.Plan(t, "m.toml", "datasets = [\"iris\"]\n"+head+models)
	large := benchtest.Plan(t, "m.toml", "datasets = [\"digits\"]\n"+head+models)
	for mi := range small.Spec.Models {
		a, err1 := small.TaskMemory(mi)
		b, err2 := large.TaskMemory(mi)
		if err1 != nil || err2 != nil {
			t.Fatal(err1, err2)
		}
		if !(b.Model > a.Model && b.Data > a.Data) {
			t.Errorf("model %s: %+v on iris, %+v on digits: want more of both on digits", small.Spec.Models[mi].Name, a, b)
		}
	}
	dm := "datasets = [\"iris\"]\n" + head + "[[model]]\nkind = \"interference\"\nmode = \"noisy\"\nmethod = \"density\"\nnoise = { depolarizing = [0.001, 0.01] }\ntrain_subset = "
	m16, err1 := benchtest.Plan(t, "m.toml", dm+"16\n").TaskMemory(0)
	m64, err2 := benchtest.Plan(t, "m.toml", dm+"64\n").TaskMemory(0)
	if err1 != nil || err2 != nil {
		t.Fatal(err1, err2)
	}
	// The shared prepared parts of train_subset (256 MiB) are in both.
	if r := float64(m64.Model-256<<21) / float64(m16.Model-256<<21); r < 8 || r > 20 {
		t.Errorf("density estimate %d bytes at train_subset 16, %d at 64: ratio %.1f, want about 16", m16.Model, m64.Model, r)
	}
}
