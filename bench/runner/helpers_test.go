package runner

import (
	"fmt"
	"testing"

	"fringe/bench/plan"
	"fringe/bench/spec"
)

func mustPlan(t *testing.T, src string) *plan.Plan {
	t.Helper()
	s, err := spec.Parse("t.toml", []byte(src))
	if err != nil {
		t.Fatal(err)
	}
	p, err := plan.New(s)
	if err != nil {
		t.Fatal(err)
	}
	return p
}

func fmtInts(x []int) string { return fmt.Sprint(x) }
