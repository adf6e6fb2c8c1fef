package bench

import (
	"bytes"
	"fmt"
	"os"
	"path"
	"path/filepath"
	"runtime"
	"strings"

	"golang.org/x/sync/errgroup"

	"fringe/results"
)

// outFile is one file of an output directory: its slash-separated name
// relative to the directory and the function that renders its bytes.
type outFile struct {
	name  string
	write func(*bytes.Buffer) error
}

// figureFiles lists the files of figures, one per figure and format.
func figureFiles(figs []results.Figure) []outFile {
	var files []outFile
	for _, f := range figs {
		for _, format := range results.FigureFormats {
			files = append(files, outFile{f.Name + "." + format, func(b *bytes.Buffer) error {
				data, err := f.Render(format)
				b.Write(data)
				return err
			}})
		}
	}
	return files
}

// writeDir renders files and writes them as the directory dir. The files
// are first written into a temporary directory beside dir, which is renamed
// into place only when every file is complete; an existing dir is replaced
// only then. On error nothing is left behind.
//
// Rendering runs concurrently, each file into its own buffer, and the
// files are written in order afterwards. The formats of one figure are
// drawn one after another in one goroutine: drawing a plot is not safe for
// concurrent use (drawing the same plot in two formats at once gave
// different bytes).
func writeDir(dir string, files []outFile) error {
	bufs := make([]bytes.Buffer, len(files))
	var g errgroup.Group
	g.SetLimit(runtime.NumCPU())
	groups := map[string][]int{}
	var order []string
	for i, f := range files {
		key := f.name
		if strings.HasPrefix(f.name, "figures/") {
			key = strings.TrimSuffix(f.name, path.Ext(f.name))
		}
		if _, ok := groups[key]; !ok {
			order = append(order, key)
		}
		groups[key] = append(groups[key], i)
	}
	for _, key := range order {
		idx := groups[key]
		g.Go(func() error {
			for _, i := range idx {
				if err := files[i].write(&bufs[i]); err != nil {
					return fmt.Errorf("write %s: %w", files[i].name, err)
				}
			}
			return nil
		})
	}
	if err := g.Wait(); err != nil {
		return err
	}
	parent := filepath.Dir(filepath.Clean(dir))
	if err := os.MkdirAll(parent, 0o755); err != nil {
		return fmt.Errorf("create output parent: %w", err)
	}
	tmp, err := os.MkdirTemp(parent, "."+filepath.Base(dir)+".partial-")
	if err != nil {
		return fmt.Errorf("create temporary output directory: %w", err)
	}
	ok := false
	defer func() {
		if !ok {
			os.RemoveAll(tmp)
		}
	}()
	if err := os.Chmod(tmp, 0o755); err != nil {
		return err
	}
	for i, f := range files {
		path := filepath.Join(tmp, filepath.FromSlash(f.name))
		if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
			return fmt.Errorf("write %s: %w", f.name, err)
		}
		if err := os.WriteFile(path, bufs[i].Bytes(), 0o644); err != nil {
			return fmt.Errorf("write %s: %w", f.name, err)
		}
	}
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
	} else if err := os.Rename(tmp, dir); err != nil {
		return fmt.Errorf("move output into %s: %w", dir, err)
	}
	ok = true
	return nil
}
