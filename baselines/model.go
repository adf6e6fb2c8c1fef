package baselines

import "gonum.org/v1/gonum/mat"

// Model is a classifier. Fit learns from the rows of X with class indices y
// in [0, nClass); Predict returns a class index per row of X. Neither may
// modify X: the harness shares one transformed matrix among models. Class order
// matters: every model breaks ties toward the lower class index (the first
// class in the dataset's class order).
//
// Fit returns an error wrapping ErrParam when the model's options do not fit
// the data (k larger than the training set, for example) and ErrData when the
// data themselves are unusable (one class only, for example).
type Model interface {
	Fit(X *mat.Dense, y []int, nClass int) error
	Predict(X *mat.Dense) ([]int, error)
}
