package benchtest

import (
	"encoding/csv"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"fringe/bench/input"
	"fringe/bench/plan"
	"fringe/bench/spec"
)

// Plan parses src as the spec file named file and plans it, failing the
// test on any error.
func Plan(t testing.TB, file, src string) *plan.Plan {
	t.Helper()
	s, err := spec.Parse(file, []byte(src))
	if err != nil {
		t.Fatal(err)
	}
	p, err := plan.New(s)
	if err != nil {
		t.Fatal(err)
	}
	return p
}

// HangLimit bounds the time one fuzz input may take. The fuzzing engine
// does not notice a hang; a panic from the watchdog crashes the worker,
// which makes the engine record the input as a failure.
const HangLimit = 10 * time.Second

// Watchdog panics if the calling fuzz input runs longer than HangLimit;
// the returned function stops it: defer benchtest.Watchdog("what")().
func Watchdog(what string) func() bool {
	t := time.AfterFunc(HangLimit, func() { panic("fuzz: " + what + " took more than " + HangLimit.String() + " (a hang)") })
	return t.Stop
}

// CheckInputError fails the test unless err is an input error
// (errors.Is(err, input.ErrBad)) with a non-empty one-line message.
func CheckInputError(t testing.TB, err error) {
	t.Helper()
	if !errors.Is(err, input.ErrBad) {
		t.Fatalf("error %v (%T) is not an input error", err, err)
	}
	if msg := err.Error(); strings.Contains(msg, "\n") || msg == "" {
		t.Fatalf("message is empty or spans lines: %q", msg)
	}
}

// Spec parses src as the spec file named file, failing the test on error.
func Spec(t testing.TB, file, src string) *spec.Spec {
	t.Helper()
	s, err := spec.Parse(file, []byte(src))
	if err != nil {
		t.Fatal(err)
	}
	return s
}

// CopyDir copies the directory tree from into to (created as needed) and
// returns to.
func CopyDir(t testing.TB, from, to string) string {
	t.Helper()
	err := filepath.WalkDir(from, func(path string, d os.DirEntry, err error) error {
		if err != nil {
			return err
		}
		rel, _ := filepath.Rel(from, path)
		if d.IsDir() {
			return os.MkdirAll(filepath.Join(to, rel), 0o755)
		}
		b, err := os.ReadFile(path)
		if err != nil {
			return err
		}
		return os.WriteFile(filepath.Join(to, rel), b, 0o644)
	})
	if err != nil {
		t.Fatal(err)
	}
	return to
}

// ReadCSV reads a whole CSV file, failing the test on error.
func ReadCSV(t testing.TB, path string) [][]string {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	recs, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	return recs
}
