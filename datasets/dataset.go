package datasets

import (
	"errors"
	"fmt"
	"strconv"

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
	// Lines locates the rows in their source file: Lines[id] is the
	// 1-based line of Source.File on which the row with row id id (a
	// value of Rows, or the Row of a Dropped entry) starts. It is indexed
	// by row id, not by position, so it is the same for a dataset and
	// every Subset or Select of it. Nil when the rows have no source
	// lines (synthetic sets). LocateRow and LocateError read it.
	Lines []int
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

// LocateRow returns "file:line" for the row with row id row (a value of
// Rows): Source.File and the row's 1-based line in it. ok is false when
// the dataset has no source lines (synthetic sets) or row is not a row id
// of its source.
func (d *Dataset) LocateRow(row int) (where string, ok bool) {
	if row < 0 || row >= len(d.Lines) || d.Lines[row] < 1 || d.Source.File == "" {
		return "", false
	}
	return d.Source.File + ":" + strconv.Itoa(d.Lines[row]), true
}

// LocateError returns "file:line" (see LocateRow) for the row named by the
// first *RowError in err's chain, as the pipeline steps return them when
// fitted and applied with the dataset's row ids (Rows). ok is false when
// err holds no *RowError or its row cannot be located.
func (d *Dataset) LocateError(err error) (where string, ok bool) {
	var re *RowError
	if !errors.As(err, &re) {
		return "", false
	}
	return d.LocateRow(re.Row)
}

// RowError reports a problem with one instance. Row is the 0-based index of
// the instance in the dataset as loaded (Dataset.Rows).
type RowError struct {
	Row int
	Err error
}

func (e *RowError) Error() string { return fmt.Sprintf("row %d: %v", e.Row, e.Err) }
func (e *RowError) Unwrap() error { return e.Err }
