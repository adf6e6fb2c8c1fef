package datasets

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"

	"gonum.org/v1/gonum/mat"
)

var (
	// ErrUnknownClass marks a class name, given to Subset, that the dataset
	// does not have.
	ErrUnknownClass = errors.New("unknown class")
	// ErrUnknownFeature marks a feature, given to Subset by name or 0-based
	// index, that the dataset does not have.
	ErrUnknownFeature = errors.New("unknown feature")
	// ErrRepeatedName marks a class or feature listed twice in a Subset
	// selection.
	ErrRepeatedName = errors.New("listed more than once")
)

// Subset returns the rows of the chosen classes restricted to the chosen
// features. An empty (or nil) slice means "all".
//
// Classes are chosen by name and keep the dataset's class order among
// themselves, whatever the order of the list; Y is renumbered to the new
// class list. Features are chosen by name, or by 0-based column index
// written as a decimal string ("2"); a string equal to a feature name always
// means that feature. The chosen features also keep the dataset's order.
// Rows keep their original indices (Rows), so outputs still name the
// instance as loaded. The result shares nothing mutable with d.
//
// An unknown class or feature gives an error wrapping ErrUnknownClass or
// ErrUnknownFeature that names it and lists the known ones; an entry given
// twice (also a name and its index) wraps ErrRepeatedName.
func (d *Dataset) Subset(classes, features []string) (*Dataset, error) {
	keepClass := make([]bool, len(d.Classes))
	if len(classes) == 0 {
		for k := range keepClass {
			keepClass[k] = true
		}
	}
	for _, c := range classes {
		k := indexOf(d.Classes, c)
		if k < 0 {
			return nil, fmt.Errorf("datasets: %s: %w %q (classes: %s)", d.Name, ErrUnknownClass, c, strings.Join(d.Classes, ", "))
		}
		if keepClass[k] {
			return nil, fmt.Errorf("datasets: %s: class %q %w", d.Name, c, ErrRepeatedName)
		}
		keepClass[k] = true
	}
	keepFeat := make([]bool, len(d.Features))
	if len(features) == 0 {
		for j := range keepFeat {
			keepFeat[j] = true
		}
	}
	for _, f := range features {
		j := indexOf(d.Features, f)
		if j < 0 {
			if i, err := strconv.Atoi(f); err == nil && i >= 0 && i < len(d.Features) && f == strconv.Itoa(i) {
				j = i
			}
		}
		if j < 0 {
			return nil, fmt.Errorf("datasets: %s: %w %q (features: %s, or a 0-based index below %d)",
				d.Name, ErrUnknownFeature, f, strings.Join(d.Features, ", "), len(d.Features))
		}
		if keepFeat[j] {
			return nil, fmt.Errorf("datasets: %s: feature %q (column %d) %w", d.Name, f, j, ErrRepeatedName)
		}
		keepFeat[j] = true
	}

	newClass := make([]int, len(d.Classes))
	var outClasses []string
	for k, keep := range keepClass {
		newClass[k] = -1
		if keep {
			newClass[k] = len(outClasses)
			outClasses = append(outClasses, d.Classes[k])
		}
	}
	var cols []int
	var outFeatures []string
	for j, keep := range keepFeat {
		if keep {
			cols = append(cols, j)
			outFeatures = append(outFeatures, d.Features[j])
		}
	}
	var idx []int
	for i, y := range d.Y {
		if keepClass[y] {
			idx = append(idx, i)
		}
	}
	out := &Dataset{
		Name:     d.Name,
		Features: outFeatures,
		Classes:  outClasses,
		X:        copyRows(d.X, idx, cols),
		Y:        make([]int, len(idx)),
		Rows:     make([]int, len(idx)),
		Source:   d.Source,
		Dropped:  append([]RowError(nil), d.Dropped...),
		Lines:    cloneInts(d.Lines),
	}
	for p, i := range idx {
		out.Y[p] = newClass[d.Y[i]]
		out.Rows[p] = d.Rows[i]
	}
	return out, nil
}

// cloneInts returns a copy of s, nil for nil.
func cloneInts(s []int) []int {
	if s == nil {
		return nil
	}
	return append(make([]int, 0, len(s)), s...)
}

// Select returns the rows at positions idx (0-based positions in d, not
// Rows values), in that order; a position may repeat. Classes, features,
// provenance and Dropped are kept; the result shares nothing mutable with
// d. If idx is empty, X is an empty *mat.Dense (IsEmpty reports true).
// Select panics if a position is out of range: positions come from the
// program (splitters), not from user input.
func (d *Dataset) Select(idx []int) *Dataset {
	out := &Dataset{
		Name:     d.Name,
		Features: append([]string(nil), d.Features...),
		Classes:  append([]string(nil), d.Classes...),
		Y:        make([]int, len(idx)),
		Rows:     make([]int, len(idx)),
		Source:   d.Source,
		Dropped:  append([]RowError(nil), d.Dropped...),
		Lines:    cloneInts(d.Lines),
	}
	for p, i := range idx {
		if i < 0 || i >= len(d.Y) {
			panic(fmt.Sprintf("datasets: Select: position %d out of range [0, %d)", i, len(d.Y)))
		}
		out.Y[p] = d.Y[i]
		out.Rows[p] = d.Rows[i]
	}
	cols := make([]int, len(d.Features))
	for j := range cols {
		cols[j] = j
	}
	out.X = copyRows(d.X, idx, cols)
	return out
}

// copyRows returns a new matrix of the given rows and columns of X, or an
// empty matrix when either list is empty.
func copyRows(X *mat.Dense, idx, cols []int) *mat.Dense {
	if len(idx) == 0 || len(cols) == 0 {
		return new(mat.Dense)
	}
	out := mat.NewDense(len(idx), len(cols), nil)
	for p, i := range idx {
		dst := out.RawRowView(p)
		for q, j := range cols {
			dst[q] = X.At(i, j)
		}
	}
	return out
}

// Validate checks the invariants of a Dataset: X has Len() rows and Dim()
// columns, Y and Rows have one entry per row, every Y is a valid class
// index, Features and Classes have no empty or repeated names, every
// feature value is finite, and, when Lines is set, every row id has a
// line (>= 1) in it. It returns the first violation found, naming the
// row (as in Rows) or the name at fault.
func (d *Dataset) Validate() error {
	if err := checkNames("feature", d.Features); err != nil {
		return fmt.Errorf("datasets: %s: %w", d.Name, err)
	}
	if err := checkNames("class", d.Classes); err != nil {
		return fmt.Errorf("datasets: %s: %w", d.Name, err)
	}
	n := len(d.Y)
	if len(d.Rows) != n {
		return fmt.Errorf("datasets: %s: %d labels but %d row ids", d.Name, n, len(d.Rows))
	}
	if n == 0 {
		if d.X != nil && !d.X.IsEmpty() {
			r, _ := d.X.Dims()
			return fmt.Errorf("datasets: %s: no labels but %d rows of features", d.Name, r)
		}
		return nil
	}
	if d.X == nil || d.X.IsEmpty() {
		return fmt.Errorf("datasets: %s: %d labels but no feature matrix", d.Name, n)
	}
	r, c := d.X.Dims()
	if r != n || c != len(d.Features) {
		return fmt.Errorf("datasets: %s: feature matrix is %dx%d, want %dx%d", d.Name, r, c, n, len(d.Features))
	}
	for i := range n {
		if d.Y[i] < 0 || d.Y[i] >= len(d.Classes) {
			return fmt.Errorf("datasets: %s: %w", d.Name, &RowError{Row: d.Rows[i], Err: fmt.Errorf("class index %d out of range [0, %d)", d.Y[i], len(d.Classes))})
		}
		if d.Lines != nil && (d.Rows[i] < 0 || d.Rows[i] >= len(d.Lines) || d.Lines[d.Rows[i]] < 1) {
			return fmt.Errorf("datasets: %s: %w", d.Name, &RowError{Row: d.Rows[i], Err: errors.New("row id has no source line")})
		}
		for j, v := range d.X.RawRowView(i) {
			if math.IsNaN(v) || math.IsInf(v, 0) {
				return fmt.Errorf("datasets: %s: %w", d.Name, &RowError{Row: d.Rows[i], Err: fmt.Errorf("feature %q is %v", d.Features[j], v)})
			}
		}
	}
	return nil
}

// checkNames reports an empty or repeated name.
func checkNames(kind string, names []string) error {
	for i, s := range names {
		if s == "" {
			return fmt.Errorf("%s %d has an empty name", kind, i)
		}
		if j := indexOf(names[:i], s); j >= 0 {
			return fmt.Errorf("%s name %q used for %d and %d", kind, s, j, i)
		}
	}
	return nil
}

// indexOf returns the position of s in list, or -1.
func indexOf(list []string, s string) int {
	for i, v := range list {
		if v == s {
			return i
		}
	}
	return -1
}
