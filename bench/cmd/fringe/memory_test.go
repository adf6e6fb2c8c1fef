package main

import (
	"path/filepath"
	"testing"
)

// TestMemoryRefused checks the fixtures of testdata/memory (sound specs
// that become bad input only under a small -memory limit): a
// plan whose tasks, as many at once as -workers, would need more than
// -memory is refused before anything runs (exit status 2, one line naming
// the spec's line and the key to change, with the estimate and the limit)
// and leaves nothing behind. The limits are small so that the embedded
// datasets exceed them; the estimates themselves are checked in
// bench/plan, baselines and qkernel.
func TestMemoryRefused(t *testing.T) {
	bad, err := filepath.Abs("testdata/memory")
	if err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		spec string
		args []string
		want []string
	}{
		// Density matrices of the 12-qubit circuits of iris (120 training
		// vectors: 7 index, 2 data, 2 class qubits) for six tasks at once.
		{"memory_density.toml", []string{"-workers", "6", "-memory", "0.25"},
			[]string{"memory_density.toml:7", "key model[1].train_subset", "12 qubits", "6 workers", "above the memory limit of 256.0 MiB"}},
		// An 8 MiB kernel cache, smaller than the 15.8 MiB kernel matrix of
		// digits' training part (1438 rows): the key is cache_mib.
		{"memory_svm.toml", []string{"-workers", "2", "-memory", "0.02"},
			[]string{"memory_svm.toml:10", "key model[1].cache_mib", "now 8 MiB", "1438 training"}},
		{"memory_knn.toml", []string{"-workers", "2", "-memory", "0.01"},
			[]string{"memory_knn.toml:7", "key model[1]", "knn-k5", "fewer workers or rows"}},
	}
	for _, c := range cases {
		t.Run(c.spec, func(t *testing.T) {
			checkRefused(t, append([]string{"run", filepath.Join(bad, c.spec)}, c.args...), c.want)
		})
	}
	// Within a limit that holds it, the k-NN spec runs.
	work := t.TempDir()
	code, _, stderr := runCmd(t, work, "run", filepath.Join(bad, "memory_knn.toml"), "-out", filepath.Join(work, "out"), "-memory", "1", "-quiet", "-figures=false")
	if code != 0 {
		t.Errorf("memory_knn.toml with -memory 1: exit status %d; stderr:\n%s", code, stderr)
	}
}
