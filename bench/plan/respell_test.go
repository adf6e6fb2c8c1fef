package plan_test

import (
	"errors"
	"strings"
	"testing"

	"fringe/bench/input"
	"fringe/bench/internal/benchtest"
	"fringe/bench/plan"
)

// TestKernelCheckNamesKeyAsWritten checks that a polynomial kernel the
// plan-time check refuses because its offset dominates (baselines
// SVM.CheckData: gamma 1e-6, offset 1e6, degree 20, the case of
// baselines' TestCheckData) is located at the offset key as the spec
// wrote it: offset, or its old spelling coef0.
func TestKernelCheckNamesKeyAsWritten(t *testing.T) {
	for _, key := range []string{"offset", "coef0"} {
		src := "name = \"x\"\nseed = 1\ndatasets = [\"iris\"]\npipelines = [\"std\"]\n[[model]]\nkind = \"svm\"\nkernel = \"poly\"\ngamma = 1e-6\ndegree = 20\n" + key + " = 1e6\n"
		_, err := plan.New(benchtest.Spec(t, "k.toml", src))
		benchtest.CheckInputError(t, err)
		var ie *input.Error
		if !errors.As(err, &ie) || ie.Key != "model[1]."+key || ie.Line != 10 {
			t.Errorf("%s: error %v, want key model[1].%s on line 10", key, err, key)
		}
		if !strings.Contains(err.Error(), "offset = 1e+06") {
			t.Errorf("%s: error %q does not name the offset", key, err)
		}
	}
}
