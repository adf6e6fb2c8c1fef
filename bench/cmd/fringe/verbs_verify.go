package main

import (
	"context"
	"fmt"
	"io"
	"strings"

	"fringe/bench/runner"
	"fringe/results"
)

// errUnverified is a run directory that does not verify (exit status 1).
type errUnverified struct{ n int }

func (e *errUnverified) Error() string {
	return fmt.Sprintf("the run directory does not verify: %d problem(s), listed above", e.n)
}

// runVerify is `fringe verify RUN_DIR`: the run directory's seals and
// digests, and its records recomputed from predictions.csv and the spec.
func runVerify(ctx context.Context, c *command, args []string, stdout, stderr io.Writer) error {
	fl := newFlags(c, stdout)
	specDir := fl.String("spec-dir", "", "folder the spec's relative data paths are resolved against (default: the spec_dir the manifest records, where the run was made)")
	pos, err := parse(fl, args, stderr)
	if err != nil {
		return helpOK(err)
	}
	if len(pos) != 1 {
		return usagef("verify takes exactly one run directory (see 'fringe verify -h')")
	}
	v, err := runner.Verify(pos[0], runner.VerifyOptions{SpecDir: *specDir})
	if err != nil {
		return err
	}
	for _, p := range v.Problems {
		fmt.Fprintf(stdout, "%s: %s\n", p.File, p.Msg)
	}
	if len(v.Problems) > 0 {
		return &errUnverified{len(v.Problems)}
	}
	fmt.Fprintf(stdout, "%s verifies: manifest.json matches its seal; %s, timings.csv and %d files match their digests; %s recomputed from predictions.csv and the spec agree\n",
		pos[0], results.DigestsFile, v.Digests, strings.Join(v.Recomputed, ", "))
	return nil
}
