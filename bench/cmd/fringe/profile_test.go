package main

import (
	"compress/gzip"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestCPUProfile checks -cpuprofile on run and demo: the usage names it,
// a run writes the profile (a gzip-compressed protocol buffer, as
// runtime/pprof writes it: it decompresses to a non-empty message) and
// its run directory as without the flag, and a profile that cannot be
// created is bad usage (exit status 2) with nothing run.
func TestCPUProfile(t *testing.T) {
	for _, verb := range []string{"run", "demo"} {
		code, out, _ := runCmd(t, "", verb, "-h")
		if code != 0 || !strings.Contains(out, "-cpuprofile FILE") {
			t.Errorf("fringe %s -h: exit %d, usage lacks -cpuprofile FILE:\n%s", verb, code, out)
		}
	}
	work := t.TempDir()
	spec := filepath.Join(work, "s.toml")
	if err := os.WriteFile(spec, []byte("name = \"p\"\nseed = 1\ndatasets = [\"iris\"]\n[cv]\nfolds = 3\n[[model]]\nkind = \"knn\"\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	prof := filepath.Join(work, "cpu.prof")
	out := filepath.Join(work, "out")
	code, _, stderr := runCmd(t, "", "run", spec, "-out", out, "-quiet", "-figures=false", "-cpuprofile", prof)
	if code != 0 {
		t.Fatalf("run -cpuprofile: exit %d: %s", code, stderr)
	}
	f, err := os.Open(prof)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	zr, err := gzip.NewReader(f)
	if err != nil {
		t.Fatalf("profile is not gzip-compressed: %v", err)
	}
	body, err := io.ReadAll(zr)
	if err != nil || len(body) == 0 {
		t.Fatalf("profile: %d bytes, error %v", len(body), err)
	}
	if _, err := os.Stat(filepath.Join(out, "predictions.csv")); err != nil {
		t.Errorf("run with -cpuprofile wrote no run directory: %v", err)
	}
	bad := filepath.Join(work, "no", "such", "dir", "cpu.prof")
	code, _, stderr = runCmd(t, "", "run", spec, "-out", filepath.Join(work, "out2"), "-quiet", "-cpuprofile", bad)
	if code != 2 || !strings.Contains(stderr, "-cpuprofile") {
		t.Errorf("unwritable profile: exit %d, stderr %q; want 2 naming -cpuprofile", code, stderr)
	}
	if _, err := os.Stat(filepath.Join(work, "out2")); err == nil {
		t.Error("unwritable profile: a run directory was written")
	}
}
