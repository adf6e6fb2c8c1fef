package outdir

import (
	"bytes"
	"errors"
	"io/fs"
	"os"
	"path/filepath"
	"sort"
	"strings"
	"testing"
)

func text(s string) func(*bytes.Buffer) error {
	return func(b *bytes.Buffer) error { b.WriteString(s); return nil }
}

// listing returns the files below dir as name=content, sorted.
func listing(t *testing.T, dir string) []string {
	t.Helper()
	var out []string
	err := filepath.WalkDir(dir, func(path string, d fs.DirEntry, err error) error {
		if err != nil || d.IsDir() {
			return err
		}
		b, err := os.ReadFile(path)
		rel, _ := filepath.Rel(dir, path)
		out = append(out, filepath.ToSlash(rel)+"="+string(b))
		return err
	})
	if err != nil {
		t.Fatal(err)
	}
	sort.Strings(out)
	return out
}

// leftovers lists the temporary directories Write leaves beside dir.
func leftovers(t *testing.T, dir string) []string {
	t.Helper()
	entries, err := os.ReadDir(filepath.Dir(dir))
	if err != nil {
		t.Fatal(err)
	}
	var out []string
	for _, e := range entries {
		if strings.HasPrefix(e.Name(), ".") {
			out = append(out, e.Name())
		}
	}
	return out
}

func TestWriteAndReplace(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "deep", "run")
	first := []File{{Name: "a.csv", Render: text("1")}, {Name: "figures/f.svg", Render: text("<svg/>")}, {Name: "figures/f.png", Render: text("png")}}
	if err := Write(dir, first); err != nil {
		t.Fatal(err)
	}
	if got, want := strings.Join(listing(t, dir), " "), "a.csv=1 figures/f.png=png figures/f.svg=<svg/>"; got != want {
		t.Fatalf("first write: %s, want %s", got, want)
	}
	// A second write replaces the whole directory: a.csv is gone.
	if err := Write(dir, []File{{Name: "b.csv", Render: text("2")}}); err != nil {
		t.Fatal(err)
	}
	if got := strings.Join(listing(t, dir), " "); got != "b.csv=2" {
		t.Fatalf("after replace: %s, want b.csv=2 only", got)
	}
	if l := leftovers(t, dir); len(l) != 0 {
		t.Errorf("temporary directories left beside the output: %v", l)
	}
}

func TestWriteFailureLeavesOldContent(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "run")
	if err := Write(dir, []File{{Name: "old.csv", Render: text("kept")}}); err != nil {
		t.Fatal(err)
	}
	boom := errors.New("boom")
	err := Write(dir, []File{
		{Name: "new.csv", Render: text("x")},
		{Name: "bad.csv", Render: func(*bytes.Buffer) error { return boom }},
	})
	if !errors.Is(err, boom) || !strings.Contains(err.Error(), "bad.csv") {
		t.Fatalf("err = %v, want the render error naming bad.csv", err)
	}
	if got := strings.Join(listing(t, dir), " "); got != "old.csv=kept" {
		t.Errorf("after a failed write: %s, want the old content only", got)
	}
	if l := leftovers(t, dir); len(l) != 0 {
		t.Errorf("temporary directories left beside the output: %v", l)
	}
	// A failed first write leaves nothing at all.
	fresh := filepath.Join(t.TempDir(), "never")
	if err := Write(fresh, []File{{Name: "bad", Render: func(*bytes.Buffer) error { return boom }}}); err == nil {
		t.Fatal("want an error")
	}
	if _, err := os.Stat(fresh); !errors.Is(err, fs.ErrNotExist) {
		t.Errorf("a failed write created %s (%v)", fresh, err)
	}
}

func TestWriteAtomicAndExclusive(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "run.json")
	if err := WriteExclusive(path, []byte("first")); err != nil {
		t.Fatal(err)
	}
	if err := WriteExclusive(path, []byte("second")); !errors.Is(err, fs.ErrExist) {
		t.Fatalf("second WriteExclusive: %v, want fs.ErrExist", err)
	}
	if b, _ := os.ReadFile(path); string(b) != "first" {
		t.Errorf("content %q, want first", b)
	}
	if err := WriteAtomic(path, []byte("third")); err != nil {
		t.Fatal(err)
	}
	if b, _ := os.ReadFile(path); string(b) != "third" {
		t.Errorf("content %q, want third", b)
	}
	entries, _ := os.ReadDir(dir)
	if len(entries) != 1 {
		t.Errorf("%d entries in the folder, want only run.json (no temporary files)", len(entries))
	}
	if err := WriteAtomic(filepath.Join(dir, "missing", "x"), nil); err == nil {
		t.Error("WriteAtomic into a missing folder succeeded")
	}
}

func TestSafeName(t *testing.T) {
	for in, want := range map[string]string{
		"std+l2":           "std+l2",
		"iris-vv":          "iris-vv",
		"a b/c\\d":         "a_b_c_d",
		"pca(0.95)":        "pca_0.95_",
		"ω-set":            "_-set",
		"../../etc/passwd": ".._.._etc_passwd",
	} {
		if got := SafeName(in); got != want {
			t.Errorf("SafeName(%q) = %q, want %q", in, got, want)
		}
	}
}
