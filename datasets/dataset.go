package datasets

import (
	"fmt"

	"gonum.org/v1/gonum/mat"
)

// Dataset is a labelled table of numeric features.
//
// X has one row per instance and one column per feature. Y holds class
// indices into Classes, whose order is the dataset's class order (for the
// embedded sets: the order of the source file's label codes); tie rules of
// the models refer to it. Rows holds, for each row of X, the 0-based index of
// the instance in the dataset as loaded, before any class or row filtering, so
// that outputs can name the original instance.
type Dataset struct {
	Name     string
	Features []string
	Classes  []string
	X        *mat.Dense
	Y        []int
	Rows     []int
	Source   Provenance
	// Dropped lists the rows a CSV import skipped under
	// CSVOptions.DropInvalid, in file order; RowError.Row is the 0-based
	// data-row index (the index the row would have had in Rows) and
	// RowError.Err a *CSVError naming the file, line and column at fault.
	// Nil for embedded and synthetic sets.
	Dropped []RowError
}

// Provenance records where a dataset came from.
type Provenance struct {
	Name      string // dataset name as used in specs
	Title     string // human-readable title
	Origin    string // where the embedded file was taken from
	Citation  string // original donors / publication
	Licence   string
	File      string // embedded file name, or the path of a user CSV
	SHA256    string // hex digest of the file's bytes
	Synthetic bool   // true for invented (generated) data
	Note      string // anything a user must know (e.g. which data variant)
}

// Len returns the number of instances.
func (d *Dataset) Len() int { return len(d.Y) }

// Dim returns the number of features.
func (d *Dataset) Dim() int { return len(d.Features) }

// ClassCounts returns the number of instances per class, in class order.
func (d *Dataset) ClassCounts() []int {
	c := make([]int, len(d.Classes))
	for _, y := range d.Y {
		c[y]++
	}
	return c
}

// RowError reports a problem with one instance. Row is the 0-based index of
// the instance in the dataset as loaded (Dataset.Rows).
type RowError struct {
	Row int
	Err error
}

func (e *RowError) Error() string { return fmt.Sprintf("row %d: %v", e.Row, e.Err) }
func (e *RowError) Unwrap() error { return e.Err }
