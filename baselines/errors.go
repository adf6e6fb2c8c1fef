package baselines

import "errors"

var (
	// ErrParam marks an option value that is invalid or does not fit the data.
	ErrParam = errors.New("invalid model parameter")
	// ErrData marks training data a model cannot learn from.
	ErrData = errors.New("unusable training data")
	// ErrNotFitted is returned by Predict before a successful Fit.
	ErrNotFitted = errors.New("model not fitted")
)
