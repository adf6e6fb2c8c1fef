package outdir

import (
	"bytes"
	"fmt"
	"os"
	"path/filepath"
	"runtime"
	"strings"

	"golang.org/x/sync/errgroup"

	"fringe/results"
)

// File is one file of an output directory: its slash-separated name
// relative to the directory and the function that renders its bytes.
type File struct {
	Name   string
	Render func(*bytes.Buffer) error
}

// FigureFiles lists the files of figures, one per figure and format
// (results.FigureFormats).
func FigureFiles(figs []results.Figure) []File {
	var files []File
	for _, f := range figs {
		for _, format := range results.FigureFormats {
			files = append(files, File{f.Name + "." + format, func(b *bytes.Buffer) error {
				data, err := f.Render(format)
				b.Write(data)
				return err
			}})
		}
	}
	return files
}

// Write renders files and writes them as the directory dir. The files
// are first written into a temporary directory beside dir, which is renamed
// into place only when every file is complete; an existing dir is replaced
// only then. On error nothing is left behind.
//
// Rendering runs concurrently (Render), each file into its own buffer,
// and the files are written in order afterwards.
func Write(dir string, files []File) error {
	out, err := Render(files)
	if err != nil {
		return err
	}
	return WriteRendered(dir, out)
}

// Rendered is a file's name and bytes.
type Rendered struct {
	Name string
	Data []byte
}

// Render renders files concurrently, at most runtime.NumCPU() at a time
// (RenderLimit).
func Render(files []File) ([]Rendered, error) { return RenderLimit(files, runtime.NumCPU()) }

// RenderLimit renders files concurrently, at most limit at a time (at
// least one), each into its own buffer, and returns them in the order
// given. Every file, each format of a figure included, is its own piece
// of work, started in the order given (Figure.Render draws one plot in
// several formats at once with the bytes of lone renderings, tested in
// results). The first error is returned, naming its file.
func RenderLimit(files []File, limit int) ([]Rendered, error) {
	bufs := make([]bytes.Buffer, len(files))
	var g errgroup.Group
	g.SetLimit(max(1, limit))
	for i := range files {
		g.Go(func() error {
			if err := files[i].Render(&bufs[i]); err != nil {
				return fmt.Errorf("write %s: %w", files[i].Name, err)
			}
			return nil
		})
	}
	if err := g.Wait(); err != nil {
		return nil, err
	}
	out := make([]Rendered, len(files))
	for i, f := range files {
		out[i] = Rendered{Name: f.Name, Data: bufs[i].Bytes()}
	}
	return out, nil
}

// WriteRendered writes rendered files as the directory dir, atomically
// (see Write).
func WriteRendered(dir string, files []Rendered) error {
	tmp, err := TempBeside(dir)
	if err != nil {
		return err
	}
	ok := false
	defer func() {
		if !ok {
			os.RemoveAll(tmp)
		}
	}()
	for _, f := range files {
		path := filepath.Join(tmp, filepath.FromSlash(f.Name))
		if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
			return fmt.Errorf("write %s: %w", f.Name, err)
		}
		if err := os.WriteFile(path, f.Data, 0o644); err != nil {
			return fmt.Errorf("write %s: %w", f.Name, err)
		}
	}
	if err := Replace(tmp, dir); err != nil {
		return err
	}
	ok = true
	return nil
}

// SafeName turns a name into a file-name fragment: letters, digits and
// ".+-" are kept, anything else becomes '_'.
func SafeName(s string) string {
	var b strings.Builder
	for _, r := range s {
		switch {
		case r >= 'a' && r <= 'z', r >= 'A' && r <= 'Z', r >= '0' && r <= '9', r == '.', r == '+', r == '-':
			b.WriteRune(r)
		default:
			b.WriteByte('_')
		}
	}
	return b.String()
}

// TempBeside creates a fresh, empty temporary directory beside dir (in
// dir's parent, which it creates if needed), named ".<base>.partial-*",
// for output that is renamed into place by Replace when complete.
func TempBeside(dir string) (string, error) {
	parent := filepath.Dir(filepath.Clean(dir))
	if err := os.MkdirAll(parent, 0o755); err != nil {
		return "", fmt.Errorf("create output parent: %w", err)
	}
	tmp, err := os.MkdirTemp(parent, "."+filepath.Base(dir)+".partial-")
	if err != nil {
		return "", fmt.Errorf("create temporary output directory: %w", err)
	}
	if err := os.Chmod(tmp, 0o755); err != nil {
		os.RemoveAll(tmp)
		return "", err
	}
	return tmp, nil
}

// Replace renames the complete directory tmp to dir. An existing dir is
// moved aside first and removed only once tmp is in place, so that dir
// always holds either the old or the new content; if the second rename
// fails the old dir is put back. A failure to remove the old copy after
// the new one is in place is not an error.
func Replace(tmp, dir string) error {
	if _, err := os.Stat(dir); err == nil {
		old := tmp + ".old"
		if err := os.Rename(dir, old); err != nil {
			return fmt.Errorf("replace %s: %w", dir, err)
		}
		if err := os.Rename(tmp, dir); err != nil {
			os.Rename(old, dir)
			return fmt.Errorf("replace %s: %w", dir, err)
		}
		os.RemoveAll(old)
		return nil
	}
	if err := os.Rename(tmp, dir); err != nil {
		return fmt.Errorf("move output into %s: %w", dir, err)
	}
	return nil
}
