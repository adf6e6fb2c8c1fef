package datasets

import (
	"errors"
	"math"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// TestOverflowLocated: a test row near the float64 limit overflows when
// standardised with the training statistics; the pipeline's error names
// the dataset row, and the dataset turns it into the CSV file and line.
func TestOverflowLocated(t *testing.T) {
	in := "x,y,kind\n" + // line 1
		"1,0.5,a\n" + // line 2, row 0
		"2,0.25,b\n" + // line 3, row 1
		"\n" + // line 4, blank
		"3,0.75,a\n" + // line 5, row 2
		"1.7e308,0.5,b\n" + // line 6, row 3: the test row
		"2,0.4,a\n" // line 7, row 4 (not the training mean, so l2 has no zero row)
	d, err := ReadCSV(strings.NewReader(in), "ovf.csv", CSVOptions{})
	if err != nil {
		t.Fatal(err)
	}
	train, test := d.Select([]int{0, 1, 2, 4}), d.Select([]int{3})
	for _, pipe := range []string{"std", "std+l2", "minmax+std"} {
		p, err := ParsePipeline(pipe)
		if err != nil {
			t.Fatal(err)
		}
		if _, err := p.FitTransform(train.X, train.Rows); err != nil {
			t.Fatalf("%s: fit: %v", pipe, err)
		}
		// Training x = {1, 2, 3, 2}: mean 2, population sd sqrt(0.5), so
		// (1.7e308 - 2)/0.7071 = 2.4e308 > MaxFloat64 (derived by hand).
		_, err = p.Transform(test.X, test.Rows)
		var re *RowError
		if !errors.As(err, &re) || re.Row != 3 || !errors.Is(err, ErrNotFiniteValue) {
			t.Fatalf("%s: transform error %v, want a RowError for row 3 wrapping ErrNotFiniteValue", pipe, err)
		}
		where, ok := d.LocateError(err)
		if !ok || where != "ovf.csv:6" {
			t.Errorf("%s: LocateError = %q, %v; want ovf.csv:6", pipe, where, ok)
		}
		if !strings.Contains(err.Error(), "overflows") {
			t.Errorf("%s: message %q does not say overflow", pipe, err)
		}
	}
}

// TestStandardizeNearLimit fits std on training values whose sum or sum of
// squares overflows: mean and scale stay finite and the output is what
// the definition gives (derived by hand).
func TestStandardizeNearLimit(t *testing.T) {
	// Column 1: +-1.5e308 alternating: mean 0, sd 1.5e308; the squares
	// overflow, so the old computation gave an infinite scale (and 0 for
	// every output). Column 2: 1.5e308, 1.5e308, 0, 0: the sum overflows;
	// mean 7.5e307, sd 7.5e307, outputs +-1. Column 3 is ordinary and must
	// be untouched by the rescaled path of the others.
	X := mat.NewDense(4, 3, []float64{
		1.5e308, 1.5e308, 1,
		-1.5e308, 1.5e308, 2,
		1.5e308, 0, 3,
		-1.5e308, 0, 4,
	})
	s := &Standardize{}
	if err := s.Fit(X); err != nil {
		t.Fatal(err)
	}
	// Tolerance: a division by the largest magnitude and one by n, each
	// correctly rounded: a few ulp.
	pipeCheckSlice(t, "mean", s.Mean, []float64{0, 7.5e307, 2.5}, 1e-15)
	pipeCheckSlice(t, "scale", s.Scale, []float64{1.5e308, 7.5e307, math.Sqrt(1.25)}, 1e-15)
	out, err := s.Transform(X, nil)
	if err != nil {
		t.Fatal(err)
	}
	r3 := math.Sqrt(1.25)
	pipeCheckMatrix(t, "std near the limit", out, [][]float64{
		{1, 1, -1.5 / r3},
		{-1, 1, -0.5 / r3},
		{1, -1, 0.5 / r3},
		{-1, -1, 1.5 / r3},
	}, 1e-15)
	// The ordinary column is bit for bit what the plain formula gives.
	plain := &Standardize{}
	if err := plain.Fit(mat.NewDense(4, 1, []float64{1, 2, 3, 4})); err != nil {
		t.Fatal(err)
	}
	if plain.Mean[0] != s.Mean[2] || plain.Scale[0] != s.Scale[2] {
		t.Errorf("ordinary column changed: %v %v vs %v %v", s.Mean[2], s.Scale[2], plain.Mean[0], plain.Scale[0])
	}
	// x - mean overflows for a test value of -1.6e308 on column 2 (mean
	// 7.5e307) but (x - mean)/scale = -3.133... is finite.
	got, err := s.Transform(mat.NewDense(1, 3, []float64{0, -1.6e308, 2.5}), nil)
	if err != nil {
		t.Fatal(err)
	}
	pipeCheckSlice(t, "std of x - mean overflow", got.RawRowView(0), []float64{0, (-1.6e308/7.5e307 - 1), 0}, 1e-15)
}

// TestMinMaxNearLimit: max - min overflows; the output follows the
// definition (derived by hand).
func TestMinMaxNearLimit(t *testing.T) {
	X := mat.NewDense(3, 1, []float64{-1.5e308, 0, 1.5e308})
	p, err := ParsePipeline("minmax")
	if err != nil {
		t.Fatal(err)
	}
	out, err := p.FitTransform(X, nil)
	if err != nil {
		t.Fatal(err)
	}
	// Tolerance: halving is exact; one division.
	pipeCheckMatrix(t, "minmax near the limit", out, [][]float64{{0}, {0.5}, {1}}, 1e-15)
}
