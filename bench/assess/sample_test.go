package assess

import (
	"slices"
	"testing"
)

// TestDeviceSample checks the choice of the device's test instances on
// folds laid out like a stratified split of a dataset sorted by class
// (Iris: 10 folds of 15 rows, 5 of each class, in dataset order): every
// class gets its share of the sample (largest remainder, at least one
// each; the expected shares derived by hand from the class counts), every
// fold is reached, no instance twice, and the positions name
// rows of the fold's test part. The old rule (evenly spread within each
// fold) took a setosa and a versicolor from every fold and no virginica.
func TestDeviceSample(t *testing.T) {
	y := make([]int, 150)
	for i := range y {
		y[i] = i / 50
	}
	tests := make([][]int, 10)
	for f := range tests {
		for c := range 3 {
			for j := range 5 {
				tests[f] = append(tests[f], 50*c+5*f+j)
			}
		}
	}
	for _, tc := range []struct {
		t    int
		want [3]int // instances per class
	}{
		{20, [3]int{7, 7, 6}}, {2, [3]int{1, 1, 0}}, {3, [3]int{1, 1, 1}}, {30, [3]int{10, 10, 10}}, {150, [3]int{50, 50, 50}}, {400, [3]int{50, 50, 50}},
	} {
		picks := deviceSample(tests, y, 3, tc.t)
		var got [3]int
		seen := map[int]bool{}
		folds := 0
		for f, ps := range picks {
			if !slices.IsSorted(ps) {
				t.Errorf("t=%d: fold %d positions %v not ascending", tc.t, f, ps)
			}
			if len(ps) > 0 {
				folds++
			}
			for _, p := range ps {
				if p < 0 || p >= len(tests[f]) {
					t.Fatalf("t=%d: fold %d position %d outside its test part", tc.t, f, p)
				}
				row := tests[f][p]
				if seen[row] {
					t.Errorf("t=%d: row %d taken twice", tc.t, row)
				}
				seen[row] = true
				got[y[row]]++
			}
		}
		if got != tc.want {
			t.Errorf("t=%d: %v instances per class, want %v", tc.t, got, tc.want)
		}
		if tc.t >= 10 && folds != 10 {
			t.Errorf("t=%d: %d folds reached, want 10", tc.t, folds)
		}
	}
	// A class of one row keeps its instance; unequal classes get shares
	// in proportion.
	y2 := []int{0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 1, 1, 1, 1, 1, 1, 2}
	tests2 := [][]int{{0, 1, 2, 3, 4, 5, 12, 13, 14}, {6, 7, 8, 9, 10, 11, 15, 16, 17, 18}}
	picks := deviceSample(tests2, y2, 3, 8)
	var got [3]int
	for f, ps := range picks {
		for _, p := range ps {
			got[y2[tests2[f][p]]]++
		}
	}
	if got != [3]int{5, 2, 1} {
		t.Errorf("unequal classes: %v instances per class, want [5 2 1]", got)
	}
}
