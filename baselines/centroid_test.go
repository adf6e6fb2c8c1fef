package baselines

import (
	"errors"
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/floats/scalar"
	"gonum.org/v1/gonum/mat"
)

// TestCentroidScikitLearn compares class means and predictions with
// scikit-learn 1.2.1 NearestCentroid() (Euclidean), fixture written by
// scripts/ref_knn.py.
func TestCentroidScikitLearn(t *testing.T) {
	f := readNeighbourFixture(t)
	if len(f.Centroid) == 0 {
		t.Fatal("fixture has no centroid entries")
	}
	for _, e := range f.Centroid {
		t.Run("case="+e.Case, func(t *testing.T) {
			c := f.Cases[e.Case]
			var m Centroid
			if err := m.Fit(rowsDense(c.XTrain), c.YTrain, c.NClass); err != nil {
				t.Fatal(err)
			}
			cent := m.Centroids()
			for k, row := range e.Centroids {
				for j, v := range row {
					// Means of at most 75 values below 10 in magnitude,
					// summed in a different order: 1e-13.
					if !scalar.EqualWithinAbsOrRel(cent.At(k, j), v, 1e-13, 1e-13) {
						t.Errorf("centroid %d column %d: %v, %s gives %v", k, j, cent.At(k, j), e.Call, v)
					}
				}
			}
			got, err := m.Predict(rowsDense(c.XTest))
			if err != nil {
				t.Fatal(err)
			}
			for i := range got {
				// scikit-learn 1.2.1, NearestCentroid().predict.
				if got[i] != e.Predicted[i] {
					t.Errorf("test row %d: predicted %d, %s gives %d", i, got[i], e.Call, e.Predicted[i])
				}
			}
		})
	}
}

// TestCentroidTiesAndAbsentClass: a test row equidistant from two centroids
// goes to the lower class index; an absent class is never predicted and has
// a NaN centroid. Derived by hand.
func TestCentroidTiesAndAbsentClass(t *testing.T) {
	// Class 1 centred at (-1, 0), class 3 at (1, 0), class 0 at (0, 5);
	// class 2 absent.
	X := rowsDense([][]float64{{-1, 1}, {-1, -1}, {1, 1}, {1, -1}, {0, 5}})
	y := []int{1, 1, 3, 3, 0}
	var m Centroid
	if err := m.Fit(X, y, 4); err != nil {
		t.Fatal(err)
	}
	got, err := m.Predict(rowsDense([][]float64{{0, 0}, {0.5, 0}, {0, 10}, {0, 2.5}}))
	if err != nil {
		t.Fatal(err)
	}
	// (0, 0): classes 1 and 3 at distance 1 -> 1. (0.5, 0): class 3.
	// (0, 10): class 0. (0, 2.5): class 0 at 2.5, classes 1, 3 at
	// sqrt(7.25) ~ 2.69 -> 0.
	want := []int{1, 3, 0, 0}
	for i := range want {
		if got[i] != want[i] {
			t.Errorf("row %d: predicted %d, want %d", i, got[i], want[i])
		}
	}
	c := m.Centroids()
	if !math.IsNaN(c.At(2, 0)) || !math.IsNaN(c.At(2, 1)) {
		t.Errorf("absent class centroid %v, want NaN", mat.Row(nil, 2, c))
	}
}

func TestCentroidErrors(t *testing.T) {
	X := rowsDense([][]float64{{1, 0}, {0, 1}})
	var m Centroid
	if err := m.Fit(X, []int{1, 1}, 2); !errors.Is(err, ErrData) || !strings.Contains(err.Error(), "1 class present") {
		t.Errorf("one class: error %v, want ErrData", err)
	}
	if _, err := m.Predict(X); !errors.Is(err, ErrNotFitted) {
		t.Errorf("Predict before Fit: error %v, want ErrNotFitted", err)
	}
	if m.Centroids() != nil {
		t.Error("Centroids before Fit is not nil")
	}
	if err := m.Fit(X, []int{0, 1}, 2); err != nil {
		t.Fatal(err)
	}
	if _, err := m.Predict(rowsDense([][]float64{{1}})); !errors.Is(err, ErrData) {
		t.Errorf("wrong column count: error %v", err)
	}
}
