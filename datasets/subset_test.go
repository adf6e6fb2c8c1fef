package datasets

import (
	"errors"
	"math"
	"slices"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// TestSubset checks class and feature selection on iris: class order,
// renumbering, preserved row ids and values. Expected rows follow from the
// embedded file, which lists 50 setosa, 50 versicolor, 50 virginica in
// that order (TestEmbeddedShape).
func TestSubset(t *testing.T) {
	d, err := Load("iris")
	if err != nil {
		t.Fatal(err)
	}
	tests := []struct {
		name     string
		classes  []string
		features []string
		wantCls  []string
		wantFeat []int // columns of d
		firstRow int   // Rows[0]
		counts   []int
	}{
		{"all", nil, nil, []string{"setosa", "versicolor", "virginica"}, []int{0, 1, 2, 3}, 0, []int{50, 50, 50}},
		// The list order does not matter: dataset order is kept.
		{"two classes reversed", []string{"virginica", "versicolor"}, nil, []string{"versicolor", "virginica"}, []int{0, 1, 2, 3}, 50, []int{50, 50}},
		{"ends", []string{"setosa", "virginica"}, []string{}, []string{"setosa", "virginica"}, []int{0, 1, 2, 3}, 0, []int{50, 50}},
		{"by name", nil, []string{"petal width (cm)", "petal length (cm)"}, []string{"setosa", "versicolor", "virginica"}, []int{2, 3}, 0, []int{50, 50, 50}},
		{"by index", []string{"virginica"}, []string{"3", "0"}, []string{"virginica"}, []int{0, 3}, 100, []int{50}},
		{"mixed", []string{"versicolor", "virginica"}, []string{"1", "petal length (cm)"}, []string{"versicolor", "virginica"}, []int{1, 2}, 50, []int{50, 50}},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			s, err := d.Subset(tt.classes, tt.features)
			if err != nil {
				t.Fatal(err)
			}
			if !slices.Equal(s.Classes, tt.wantCls) || !slices.Equal(s.ClassCounts(), tt.counts) {
				t.Errorf("classes %q counts %v, want %q %v", s.Classes, s.ClassCounts(), tt.wantCls, tt.counts)
			}
			if s.Rows[0] != tt.firstRow {
				t.Errorf("Rows[0] = %d, want %d", s.Rows[0], tt.firstRow)
			}
			if err := s.Validate(); err != nil {
				t.Fatal(err)
			}
			for p, row := range s.Rows {
				// Y is renumbered: the class name must be unchanged.
				if s.Classes[s.Y[p]] != d.Classes[d.Y[row]] {
					t.Fatalf("row %d: class %q, was %q", row, s.Classes[s.Y[p]], d.Classes[d.Y[row]])
				}
				for q, j := range tt.wantFeat {
					// Subset copies values, so == is exact.
					if s.Features[q] != d.Features[j] || s.X.At(p, q) != d.X.At(row, j) {
						t.Fatalf("row %d feature %d: %q=%v, want %q=%v", row, q, s.Features[q], s.X.At(p, q), d.Features[j], d.X.At(row, j))
					}
				}
			}
			// Nothing mutable is shared.
			s.X.Set(0, 0, -1)
			s.Classes[0] = "x"
			s.Features[0] = "x"
			if d.X.At(s.Rows[0], tt.wantFeat[0]) == -1 || d.Classes[0] == "x" || d.Features[0] == "x" {
				t.Error("Subset shares memory with its input")
			}
		})
	}
}

func TestSubsetErrors(t *testing.T) {
	d, err := Load("wine")
	if err != nil {
		t.Fatal(err)
	}
	tests := []struct {
		name              string
		classes, features []string
		want              error
		mention           string
	}{
		{"unknown class", []string{"class_0", "class_9"}, nil, ErrUnknownClass, `"class_9"`},
		{"unknown feature", nil, []string{"alcohol", "acidity"}, ErrUnknownFeature, `"acidity"`},
		{"index out of range", nil, []string{"13"}, ErrUnknownFeature, `"13"`},
		{"negative index", nil, []string{"-1"}, ErrUnknownFeature, `"-1"`},
		{"padded index", nil, []string{"01"}, ErrUnknownFeature, `"01"`},
		{"repeated class", []string{"class_1", "class_1"}, nil, ErrRepeatedName, `"class_1"`},
		{"name and its index", nil, []string{"ash", "2"}, ErrRepeatedName, `"2"`},
	}
	for _, tt := range tests {
		_, err := d.Subset(tt.classes, tt.features)
		if !errors.Is(err, tt.want) {
			t.Errorf("%s: error %v, want %v", tt.name, err, tt.want)
			continue
		}
		if msg := err.Error(); !strings.HasPrefix(msg, "datasets: wine: ") || !strings.Contains(msg, tt.mention) {
			t.Errorf("%s: message %q does not name %s", tt.name, msg, tt.mention)
		}
	}
}

// TestSubsetNumericFeatureName checks that a feature literally named "0"
// wins over the index 0.
func TestSubsetNumericFeatureName(t *testing.T) {
	d := &Dataset{Name: "t", Features: []string{"a", "0"}, Classes: []string{"p", "q"},
		X: mat.NewDense(2, 2, []float64{1, 2, 3, 4}), Y: []int{0, 1}, Rows: []int{0, 1}}
	s, err := d.Subset(nil, []string{"0"})
	if err != nil {
		t.Fatal(err)
	}
	if !slices.Equal(s.Features, []string{"0"}) || s.X.At(1, 0) != 4 {
		t.Errorf("features %q X %v", s.Features, mat.Formatted(s.X))
	}
}

// TestSubsetAfterDrop checks that Subset keeps the file row ids of a CSV
// import with dropped rows (testdata/good/dirty.csv keeps rows 0, 2, 4, 7).
func TestSubsetAfterDrop(t *testing.T) {
	d, err := LoadCSV("testdata/good/dirty.csv", CSVOptions{DropInvalid: true})
	if err != nil {
		t.Fatal(err)
	}
	s, err := d.Subset([]string{"versicolor", "setosa"}, []string{"width"})
	if err != nil {
		t.Fatal(err)
	}
	// setosa rows 0 and 2, versicolor row 7; setosa stays first because it
	// was seen first in the file.
	if !slices.Equal(s.Rows, []int{0, 2, 7}) || !slices.Equal(s.Y, []int{0, 0, 1}) || !slices.Equal(s.Classes, []string{"setosa", "versicolor"}) {
		t.Errorf("Rows %v Y %v classes %q", s.Rows, s.Y, s.Classes)
	}
	if len(s.Dropped) != len(d.Dropped) {
		t.Errorf("Dropped not kept: %d, want %d", len(s.Dropped), len(d.Dropped))
	}
}

func TestSelect(t *testing.T) {
	d, err := Load("iris")
	if err != nil {
		t.Fatal(err)
	}
	s := d.Select([]int{149, 0, 0, 75})
	if !slices.Equal(s.Rows, []int{149, 0, 0, 75}) || !slices.Equal(s.Y, []int{2, 0, 0, 1}) {
		t.Errorf("Rows %v Y %v", s.Rows, s.Y)
	}
	for p, i := range s.Rows {
		if !slices.Equal(mat.Row(nil, p, s.X), mat.Row(nil, i, d.X)) {
			t.Errorf("row %d differs", i)
		}
	}
	s.X.Set(0, 0, -1)
	if d.X.At(149, 0) == -1 {
		t.Error("Select shares memory with its input")
	}
	if err := s.Validate(); err != nil {
		t.Error(err)
	}
	empty := d.Select(nil)
	if empty.Len() != 0 || !empty.X.IsEmpty() || empty.Dim() != 4 {
		t.Errorf("empty selection: Len %d Dim %d", empty.Len(), empty.Dim())
	}
	if err := empty.Validate(); err != nil {
		t.Error(err)
	}
	defer func() {
		if recover() == nil {
			t.Error("Select(150) did not panic")
		}
	}()
	d.Select([]int{150})
}

func TestValidate(t *testing.T) {
	good := func() *Dataset {
		return &Dataset{Name: "t", Features: []string{"a", "b"}, Classes: []string{"p", "q"},
			X: mat.NewDense(2, 2, []float64{1, 2, 3, 4}), Y: []int{0, 1}, Rows: []int{5, 9}}
	}
	if err := good().Validate(); err != nil {
		t.Fatal(err)
	}
	tests := []struct {
		name    string
		break_  func(d *Dataset)
		mention string
	}{
		{"class index", func(d *Dataset) { d.Y[1] = 2 }, "row 9"},
		{"NaN", func(d *Dataset) { d.X.Set(0, 1, math.NaN()) }, "row 5"},
		{"rows length", func(d *Dataset) { d.Rows = d.Rows[:1] }, "row ids"},
		{"matrix shape", func(d *Dataset) { d.Features = append(d.Features, "c") }, "2x2"},
		{"repeated feature", func(d *Dataset) { d.Features[1] = "a" }, `"a"`},
		{"empty class", func(d *Dataset) { d.Classes[0] = "" }, "empty"},
	}
	for _, tt := range tests {
		d := good()
		tt.break_(d)
		err := d.Validate()
		if err == nil || !strings.Contains(err.Error(), tt.mention) {
			t.Errorf("%s: Validate() = %v, want an error mentioning %q", tt.name, err, tt.mention)
		}
	}
}
