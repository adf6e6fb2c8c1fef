package qkernel_test

import (
	"fringe/baselines"
	"fringe/qkernel"
)

// The classifier satisfies the harness's model interface structurally; the
// check lives in an external test package so that qkernel itself never
// imports baselines.
var _ baselines.Model = (*qkernel.Classifier)(nil)
