package outdir

import (
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
)

// WriteExclusive writes data to path unless path exists (fs.ErrExist):
// the file is written under a temporary name and hard-linked into place,
// which fails if another process got there first. Where hard links are
// not supported it falls back to a rename after checking that path does
// not exist.
func WriteExclusive(path string, data []byte) error {
	f, err := os.CreateTemp(filepath.Dir(path), ".tmp-"+filepath.Base(path)+"-")
	if err != nil {
		return err
	}
	tmp := f.Name()
	defer os.Remove(tmp)
	_, err = f.Write(data)
	if cerr := f.Close(); err == nil {
		err = cerr
	}
	if err == nil {
		err = os.Chmod(tmp, 0o644)
	}
	if err != nil {
		return fmt.Errorf("write %s: %w", path, err)
	}
	lerr := os.Link(tmp, path)
	if lerr == nil || errors.Is(lerr, fs.ErrExist) {
		return lerr
	}
	if _, err := os.Lstat(path); err == nil {
		return fs.ErrExist
	}
	if err := os.Rename(tmp, path); err != nil {
		return fmt.Errorf("write %s: %w", path, err)
	}
	return nil
}

// WriteAtomic writes data to a temporary file beside path and renames it
// into place, so that path is either absent (or its old content) or
// complete, whenever the process dies.
func WriteAtomic(path string, data []byte) error {
	f, err := os.CreateTemp(filepath.Dir(path), ".tmp-"+filepath.Base(path)+"-")
	if err != nil {
		return err
	}
	tmp := f.Name()
	_, err = f.Write(data)
	if cerr := f.Close(); err == nil {
		err = cerr
	}
	if err == nil {
		err = os.Chmod(tmp, 0o644)
	}
	if err == nil {
		err = os.Rename(tmp, path)
	}
	if err != nil {
		os.Remove(tmp)
		return fmt.Errorf("write %s: %w", path, err)
	}
	return nil
}
