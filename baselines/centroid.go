package baselines

import (
	"fmt"
	"math"

	"gonum.org/v1/gonum/mat"
)

// Centroid is the nearest-centroid classifier: each class is represented by
// the mean of its training rows, and a row is assigned to the class whose
// mean is nearest in Euclidean distance, the lowest class index among equals.
// Classes absent from the training labels have no centroid and are never
// predicted. It has no options; it is a sanity baseline.
type Centroid struct {
	nClass    int
	d         int
	present   []bool
	centroids []float64 // nClass x d, row-major; rows of absent classes NaN
	fitted    bool
}

var _ Model = (*Centroid)(nil)

// Fit computes the class means. It returns an error wrapping ErrData for
// inconsistent or non-finite data or fewer than two classes present (as
// scikit-learn's NearestCentroid).
func (m *Centroid) Fit(X *mat.Dense, y []int, nClass int) error {
	m.fitted = false
	n, d, err := validateFitArgs("centroid", X, y, nClass)
	if err != nil {
		return err
	}
	present, count := classesPresent(y, nClass)
	if count < 2 {
		return fmt.Errorf("baselines: centroid: %d class present in the training labels, need at least 2: %w", count, ErrData)
	}
	c := make([]float64, nClass*d)
	size := make([]int, nClass)
	for i := range n {
		row := X.RawRowView(i)
		dst := c[y[i]*d : (y[i]+1)*d]
		for j, v := range row {
			dst[j] += v
		}
		size[y[i]]++
	}
	for k := range nClass {
		dst := c[k*d : (k+1)*d]
		for j := range dst {
			if present[k] {
				dst[j] /= float64(size[k])
			} else {
				dst[j] = math.NaN()
			}
		}
	}
	m.nClass, m.d, m.present, m.centroids = nClass, d, present, c
	m.fitted = true
	return nil
}

// Predict returns the class of the nearest centroid for each row of X.
func (m *Centroid) Predict(X *mat.Dense) ([]int, error) {
	if !m.fitted {
		return nil, fmt.Errorf("baselines: centroid: %w", ErrNotFitted)
	}
	if err := validatePredictArgs("centroid", X, m.d); err != nil {
		return nil, err
	}
	r, _ := X.Dims()
	pred := make([]int, r)
	for i := range r {
		t := X.RawRowView(i)
		best, bestD := -1, math.Inf(1)
		for k := range m.nClass {
			if !m.present[k] {
				continue
			}
			dk := sqDistBounded(m.centroids[k*m.d:(k+1)*m.d], t, math.Inf(1))
			if best < 0 || dk < bestD {
				best, bestD = k, dk
			}
		}
		pred[i] = best
	}
	return pred, nil
}

// Centroids returns a copy of the class means, one row per class index; the
// row of a class absent from the training labels is NaN. It returns nil
// before Fit.
func (m *Centroid) Centroids() *mat.Dense {
	if !m.fitted {
		return nil
	}
	return mat.NewDense(m.nClass, m.d, append([]float64(nil), m.centroids...))
}
